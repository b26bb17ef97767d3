import { useEffect, useRef } from 'react';
import { View } from 'react-native';
import { colors, radius } from '../theme';
import type { CameraFrameProps } from './CameraFrame.types';

interface VideoLike {
  style: { width: string; height: string; objectFit: string; position: string; inset: string };
}
interface NodeLike {
  querySelector(selector: string): VideoLike | null;
}

/**
 * On the web the camera's <video> arrives without its size (expo-camera hands it a style array
 * that a plain DOM element cannot take), so the frame sizes it: it fills the box, cropped.
 */
export function CameraFrame({ children, height }: CameraFrameProps) {
  const ref = useRef<View | null>(null);
  useEffect(() => {
    const node = ref.current as unknown as NodeLike | null; // react-native-web: a View's ref is its DOM element
    if (!node) return;
    const fit = () => {
      const video = node.querySelector('video');
      if (!video) return false;
      Object.assign(video.style, { position: 'absolute', inset: '0', width: '100%', height: '100%', objectFit: 'cover' });
      return true;
    };
    if (fit()) return;
    const timer = setInterval(() => {
      if (fit()) clearInterval(timer);
    }, 100);
    return () => clearInterval(timer);
  }, []);
  return (
    <View ref={ref} style={{ height, position: 'relative', borderRadius: radius.md, overflow: 'hidden', backgroundColor: colors.ink }}>
      {children}
    </View>
  );
}
