import { View } from 'react-native';
import { colors, radius } from '../theme';
import type { CameraFrameProps } from './CameraFrame.types';

/** The camera preview's frame: a fixed-height, rounded box the preview fills. */
export function CameraFrame({ children, height }: CameraFrameProps) {
  return <View style={{ height, borderRadius: radius.md, overflow: 'hidden', backgroundColor: colors.ink }}>{children}</View>;
}
