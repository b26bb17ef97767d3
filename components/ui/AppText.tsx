import { Text, type TextProps } from 'react-native';
import { colors, type } from '../theme';

type Variant = keyof typeof type;

/**
 * A heading's level follows its size unless given: display is the screen's one level-one heading,
 * title a section (2), heading a part of one (3). Assistive technology reads the outline from them.
 */
const HEADING_LEVELS: Partial<Record<Variant, number>> = { display: 1, title: 2, heading: 3 };

export function AppText({ variant = 'body', muted, style, ...rest }: TextProps & { variant?: Variant; muted?: boolean; 'aria-level'?: number }) {
  const level = rest.role === 'heading' && rest['aria-level'] === undefined ? HEADING_LEVELS[variant] : undefined;
  return <Text {...(level ? { 'aria-level': level } : null)} {...rest} style={[type[variant], { color: muted ? colors.inkMuted : colors.ink }, style]} />;
}
