import type { ReactNode } from 'react';

export interface CameraFrameProps {
  children: ReactNode;
  /** Preview height in points. */
  height: number;
}
