import { Text, type TextProps } from 'react-native';
import { colors, type } from '../theme';

type Variant = keyof typeof type;

export function AppText({ variant = 'body', muted, style, ...rest }: TextProps & { variant?: Variant; muted?: boolean }) {
  return <Text {...rest} style={[type[variant], { color: muted ? colors.inkMuted : colors.ink }, style]} />;
}
