import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, radius, space } from '../theme';
import { AppText } from './AppText';
import { MAIL_DEFERRAL } from '../../shared/deferral';

type Tone = 'error' | 'info' | 'success' | 'caution';

const palette: Record<Tone, { bg: string; fg: string; border: string }> = {
  error: { bg: colors.dangerSoft, fg: colors.danger, border: colors.danger },
  info: { bg: colors.spruceSoft, fg: colors.spruce, border: colors.spruce },
  success: { bg: colors.goodSoft, fg: colors.good, border: colors.good },
  caution: { bg: colors.ochreSoft, fg: '#5A3B00', border: colors.ochre },
};

/** A message in the flow of a form or a screen: errors are announced (role=alert). */
export function Notice({
  tone = 'info',
  title,
  children,
  testID,
}: {
  tone?: Tone;
  title?: string;
  children?: ReactNode;
  testID?: string;
}) {
  const c = palette[tone];
  return (
    <View
      style={[styles.box, { backgroundColor: c.bg, borderLeftColor: c.border }]}
      role={tone === 'error' ? 'alert' : undefined}
      testID={testID}
    >
      {title ? (
        <AppText variant="label" style={{ color: c.fg }}>
          {title}
        </AppText>
      ) : null}
      {typeof children === 'string' ? <AppText style={{ color: tone === 'error' ? c.fg : colors.ink }}>{children}</AppText> : children}
    </View>
  );
}


export function SafetyCaution({ text, testID }: { text?: string; testID?: string }) {
  // A caution written for the catalogue may already say who governs: do not say it twice.
  const saysWhoGoverns = text ? /licensed practice/i.test(text) : false;
  return (
    <Notice tone="caution" title="Caution" testID={testID}>
      <AppText variant="small">
        {text ? `${text} ` : ''}
        {saysWhoGoverns ? '' : MAIL_DEFERRAL}
      </AppText>
    </Notice>
  );
}

const styles = StyleSheet.create({
  box: { borderRadius: radius.md, borderLeftWidth: 4, padding: space.md, gap: space.xs },
});
