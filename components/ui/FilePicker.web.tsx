import { createElement, useRef } from 'react';
import { View } from 'react-native';
import { Button } from './Button';
import type { FilePickerProps } from './FilePicker.types';

/** On the web: the browser's file chooser, read as UTF-8 text. */
export function FilePicker({ label, accept, onText, onError, testID }: FilePickerProps) {
  const input = useRef<HTMLInputElement | null>(null);
  return (
    <View>
      {createElement('input', {
        ref: input,
        type: 'file',
        accept,
        'data-testid': testID ? `${testID}-input` : undefined,
        style: { display: 'none' },
        onChange: (e: { target: HTMLInputElement }) => {
          const file = e.target.files?.[0];
          if (!file) return;
          const reader = new FileReader();
          reader.onload = () => onText(String(reader.result ?? ''), file.name);
          reader.onerror = () => onError?.('That file could not be read.');
          reader.readAsText(file, 'utf-8');
          e.target.value = '';
        },
      })}
      <Button label={label} tone="secondary" testID={testID} onPress={() => input.current?.click()} />
    </View>
  );
}
