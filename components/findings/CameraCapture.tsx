import { CameraView, useCameraPermissions } from 'expo-camera';
import { useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { preparePhotos } from '../photos/prepare';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { CameraFrame } from './CameraFrame';
import { photoKey, type PickedPhoto } from './PhotoPicker.types';

type Phase = 'closed' | 'checking' | 'no_camera' | 'denied' | 'open';

/** A data: URI (the browser camera's answer) as a Blob, without fetch (the page's CSP allows fetch to 'self' only). */
function dataUriToBlob(uri: string): Blob {
  const [head, body = ''] = uri.split(',', 2);
  const type = /data:([^;]+)/.exec(head ?? '')?.[1] ?? 'image/jpeg';
  const bytes = atob(body);
  const out = new Uint8Array(bytes.length);
  for (let i = 0; i < bytes.length; i++) out[i] = bytes.charCodeAt(i);
  return new Blob([out], { type });
}

/**
 * The camera in the page (expo-camera; in a browser it needs a secure context, which localhost is).
 * Asks for permission when opened; where there is no camera or it is refused, says so and points
 * to choosing a photo from files instead.
 */
export function CameraCapture({ onPhoto, disabled, testID = 'camera' }: { onPhoto: (photo: PickedPhoto) => void; disabled?: boolean; testID?: string }) {
  const [phase, setPhase] = useState<Phase>('closed');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [permission, requestPermission] = useCameraPermissions();
  const camera = useRef<CameraView | null>(null);

  async function open() {
    setError(null);
    setPhase('checking');
    try {
      if (!(await CameraView.isAvailableAsync())) {
        setPhase('no_camera');
        return;
      }
      const granted = permission?.granted || (await requestPermission()).granted;
      setPhase(granted ? 'open' : 'denied');
    } catch {
      setPhase('no_camera');
    }
  }

  async function take() {
    if (!camera.current) return;
    setBusy(true);
    setError(null);
    try {
      const shot = await camera.current.takePictureAsync({ quality: 0.85 });
      const name = `camera-${new Date().toISOString().replace(/[:.]/g, '-')}.jpg`;
      if (shot.uri.startsWith('data:')) {
        const blob = dataUriToBlob(shot.uri);
        // Downscaled on the device and checked against the room left before the form holds it.
        const { photos, refused } = await preparePhotos([{ key: photoKey(), name, type: blob.type, blob, uri: URL.createObjectURL(blob) }]);
        if (refused) setError(refused);
        for (const p of photos) onPhoto(p);
      } else {
        onPhoto({ key: photoKey(), name, type: 'image/jpeg', uri: shot.uri });
      }
    } catch {
      setError('The photo could not be taken. Try again, or choose one from your files.');
    } finally {
      setBusy(false);
    }
  }

  if (phase === 'closed' || phase === 'checking') {
    return (
      <Button
        label="Take a photo with the camera"
        tone="secondary"
        testID={`${testID}-open`}
        busy={phase === 'checking'}
        disabled={disabled}
        onPress={open}
      />
    );
  }
  if (phase === 'no_camera' || phase === 'denied') {
    return (
      <View style={styles.wrap}>
        <Notice tone="info" testID={`${testID}-unavailable`}>
          {phase === 'no_camera'
            ? 'No camera is available in this browser. Choose the photo from your files instead.'
            : 'The camera was not allowed. Allow it in the browser’s site settings, or choose the photo from your files.'}
        </Notice>
        <Button label="Try the camera again" tone="quiet" testID={`${testID}-retry`} onPress={open} />
      </View>
    );
  }
  return (
    <View style={styles.wrap} testID={`${testID}-view`}>
      <CameraFrame height={300}>
        <CameraView
          ref={camera}
          style={styles.preview}
          facing="back"
          onMountError={() => {
            setPhase('no_camera');
          }}
        />
      </CameraFrame>
      {error ? <Notice tone="error">{error}</Notice> : null}
      <View style={styles.row}>
        <Button label="Take photo" testID={`${testID}-shoot`} busy={busy} onPress={take} style={styles.grow} />
        <Button label="Close camera" tone="quiet" testID={`${testID}-close`} onPress={() => setPhase('closed')} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  preview: { flex: 1 },
  row: { flexDirection: 'row', gap: space.sm, alignItems: 'center' },
  grow: { flexGrow: 1 },
});
