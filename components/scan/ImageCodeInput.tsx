import type { ImageCodeInputProps } from './ImageCodeInput.types';

/** Off the web the camera reads the code itself; no image file input. */
export function ImageCodeInput(_props: ImageCodeInputProps) {
  return null;
}
