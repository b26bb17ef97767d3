import { CameraView, useCameraPermissions } from 'expo-camera';
import { useEffect, useRef } from 'react';
import { StyleSheet, View } from 'react-native';
import { CameraFrame } from '../findings/CameraFrame';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import type { QrCameraProps } from './QrCamera.types';

/** On a phone app: expo-camera reads QR codes itself. */
export function QrCamera({ onCode, onClose, testID = 'scan-camera' }: QrCameraProps) {
  const [permission, requestPermission] = useCameraPermissions();
  const last = useRef<string | null>(null);
  useEffect(() => {
    if (permission && !permission.granted && permission.canAskAgain) void requestPermission();
  }, [permission, requestPermission]);
  if (permission && !permission.granted) {
    return (
      <Notice tone="info" testID={`${testID}-unavailable`}>
        The camera was not allowed. Allow it in the phone’s settings, or type the tag.
      </Notice>
    );
  }
  return (
    <View style={styles.wrap} testID={`${testID}-view`}>
      <CameraFrame height={300}>
        <CameraView
          style={styles.preview}
          facing="back"
          barcodeScannerSettings={{ barcodeTypes: ['qr'] }}
          onBarcodeScanned={({ data }) => {
            // The same label stays in view for many frames: act on it once.
            if (data === last.current) return;
            last.current = data;
            onCode(data);
          }}
        />
      </CameraFrame>
      <Button label="Close camera" tone="quiet" testID={`${testID}-close`} onPress={onClose} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  preview: { flex: 1 },
});
