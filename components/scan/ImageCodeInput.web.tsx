import { createElement, useRef, useState } from 'react';
import { View } from 'react-native';
import { Button } from '../ui/Button';
import { decodeImageFile } from './webDecode';
import type { ImageCodeInputProps } from './ImageCodeInput.types';

/**
 * "Choose a photo of the label": for a browser without a camera, a refused camera, or a label
 * photographed earlier. On a phone the browser offers the camera app as well (accept image/*).
 */
export function ImageCodeInput({ onResult, disabled, testID = 'scan-image' }: ImageCodeInputProps) {
  const input = useRef<HTMLInputElement | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <View>
      {createElement('input', {
        ref: input,
        type: 'file',
        accept: 'image/*',
        'data-testid': `${testID}-input`,
        style: { display: 'none' },
        onChange: (e: { target: HTMLInputElement }) => {
          const file = e.target.files?.[0];
          e.target.value = '';
          if (!file) return;
          setBusy(true);
          decodeImageFile(file)
            .catch(() => null)
            .then((text) => onResult(text))
            .finally(() => setBusy(false));
        },
      })}
      <Button label="Choose a photo of the label" tone="secondary" busy={busy} disabled={disabled} testID={testID} onPress={() => input.current?.click()} />
    </View>
  );
}
