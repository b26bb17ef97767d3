import { createElement, useRef } from 'react';
import { View } from 'react-native';
import { Button } from '../ui/Button';
import { PLAN_ACCEPT, PLAN_MAX_BYTES, type PlanFilePickerProps } from './PlanFilePicker.types';

/** On the web: the browser's file chooser for one PNG, JPEG or PDF. */
export function PlanFilePicker({ label, onPick, onError, disabled, busy, testID }: PlanFilePickerProps) {
  const input = useRef<HTMLInputElement | null>(null);
  return (
    <View>
      {createElement('input', {
        ref: input,
        type: 'file',
        accept: PLAN_ACCEPT,
        'data-testid': testID ? `${testID}-input` : undefined,
        style: { display: 'none' },
        onChange: (e: { target: HTMLInputElement }) => {
          const file = e.target.files?.[0];
          e.target.value = '';
          if (!file) return;
          if (file.size > PLAN_MAX_BYTES) {
            onError?.(`That file is ${(file.size / 1024 / 1024).toFixed(1)} MB; a plan file must be at most 15 MB.`);
            return;
          }
          onPick({ name: file.name || 'plan', type: file.type || 'application/octet-stream', blob: file, uri: '' });
        },
      })}
      <Button label={label} tone="secondary" testID={testID} disabled={disabled} busy={busy} onPress={() => input.current?.click()} />
    </View>
  );
}
