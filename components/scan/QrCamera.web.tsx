import { createElement, useEffect, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { CameraFrame } from '../findings/CameraFrame';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { decodePixels, nativeDetector, pixelsOf } from './webDecode';
import type { QrCameraProps } from './QrCamera.types';

type Phase = 'starting' | 'open' | 'no_camera' | 'denied';

/** Frames read per second: enough to feel instant, light on a phone's battery. */
const FRAME_MS = 200;

/**
 * In a browser: the back camera as a <video> (getUserMedia; a secure context, which localhost
 * is), each frame read with the browser's BarcodeDetector where there is one, else jsQR on a
 * canvas copy. The stream is stopped when the camera closes or the screen goes.
 */
export function QrCamera({ onCode, onClose, testID = 'scan-camera' }: QrCameraProps) {
  const video = useRef<HTMLVideoElement | null>(null);
  const [phase, setPhase] = useState<Phase>('starting');
  const handler = useRef(onCode);
  handler.current = onCode;

  useEffect(() => {
    let stream: MediaStream | null = null;
    let timer: ReturnType<typeof setTimeout> | null = null;
    let stopped = false;
    let last: string | null = null;
    const read = async () => {
      const v = video.current;
      if (stopped || !v) return;
      if (v.readyState >= 2 && v.videoWidth > 0) {
        const native = await nativeDetector();
        let text: string | null = null;
        if (native) text = (await native.detect(v).catch(() => []))[0]?.rawValue ?? null;
        else {
          const pixels = pixelsOf(v, v.videoWidth, v.videoHeight);
          text = pixels ? await decodePixels(pixels.data, pixels.width, pixels.height) : null;
        }
        // The same label stays in view for many frames: act on it once.
        if (text && text !== last && !stopped) {
          last = text;
          handler.current(text);
        }
      }
      if (!stopped) timer = setTimeout(() => void read(), FRAME_MS);
    };
    (async () => {
      if (!navigator.mediaDevices?.getUserMedia) {
        setPhase('no_camera');
        return;
      }
      try {
        stream = await navigator.mediaDevices.getUserMedia({ video: { facingMode: 'environment' }, audio: false });
      } catch (err) {
        setPhase((err as { name?: string }).name === 'NotAllowedError' ? 'denied' : 'no_camera');
        return;
      }
      if (stopped) {
        stream.getTracks().forEach((t) => t.stop());
        return;
      }
      setPhase('open');
      const v = video.current;
      if (v) {
        v.srcObject = stream;
        await v.play().catch(() => undefined);
      }
      void read();
    })();
    return () => {
      stopped = true;
      if (timer) clearTimeout(timer);
      stream?.getTracks().forEach((t) => t.stop());
    };
  }, []);

  if (phase === 'no_camera' || phase === 'denied') {
    return (
      <View style={styles.wrap}>
        <Notice tone="info" testID={`${testID}-unavailable`}>
          {phase === 'no_camera'
            ? 'No camera is available in this browser. Choose a photo of the label instead, or type the tag.'
            : 'The camera was not allowed. Allow it in the browser’s site settings, choose a photo of the label, or type the tag.'}
        </Notice>
        <Button label="Close" tone="quiet" testID={`${testID}-close`} onPress={onClose} />
      </View>
    );
  }
  return (
    <View style={styles.wrap} testID={`${testID}-view`}>
      <CameraFrame height={300}>
        {createElement('video', {
          ref: video,
          muted: true,
          playsInline: true,
          autoPlay: true,
          'data-testid': `${testID}-video`,
          'aria-label': 'Camera: point it at the unit’s label',
          style: { position: 'absolute', inset: 0, width: '100%', height: '100%', objectFit: 'cover' },
        })}
      </CameraFrame>
      <Button label="Close camera" tone="quiet" testID={`${testID}-close`} onPress={onClose} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
});
