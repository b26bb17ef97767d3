import { createElement, useRef } from 'react';
import { View } from 'react-native';
import { preparePhotos } from '../photos/prepare';
import { Button } from '../ui/Button';
import { photoKey, type PhotoPickerProps } from './PhotoPicker.types';

/**
 * On the web: the browser's file chooser for images. On a phone's browser `capture` offers the
 * rear camera first; elsewhere it opens the files. Several photos can be chosen at once.
 */
export function PhotoPicker({ label, onPick, onError, disabled, testID }: PhotoPickerProps) {
  const input = useRef<HTMLInputElement | null>(null);
  return (
    <View>
      {createElement('input', {
        ref: input,
        type: 'file',
        accept: 'image/*',
        capture: 'environment',
        multiple: true,
        'data-testid': testID ? `${testID}-input` : undefined,
        style: { display: 'none' },
        onChange: (e: { target: HTMLInputElement }) => {
          const files = Array.from(e.target.files ?? []);
          e.target.value = '';
          const images = files.filter((f) => f.type === '' || f.type.startsWith('image/'));
          if (images.length < files.length) onError?.('Only photos can be attached (JPEG, PNG, WebP or HEIC).');
          if (images.length === 0) return;
          // Downscaled on the device and checked against the room left before the form holds them.
          void preparePhotos(
            images.map((f) => ({
              key: photoKey(),
              name: f.name || 'photo.jpg',
              type: f.type || 'image/jpeg',
              blob: f as Blob,
              uri: URL.createObjectURL(f),
            })),
          ).then(({ photos, refused }) => {
            if (refused) onError?.(refused);
            if (photos.length) onPick(photos);
          });
        },
      })}
      <Button label={label} tone="secondary" testID={testID} disabled={disabled} onPress={() => input.current?.click()} />
    </View>
  );
}
