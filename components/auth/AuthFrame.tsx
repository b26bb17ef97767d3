import { Link, type Href } from 'expo-router';
import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Screen } from '../ui/Screen';
import { Wordmark } from '../ui/Wordmark';

/** The frame of the signed-out screens: the wordmark, one card, and links under it. */
export function AuthFrame({
  testID,
  title,
  intro,
  children,
  footer,
}: {
  testID: string;
  title: string;
  intro?: string;
  children: ReactNode;
  footer?: ReactNode;
}) {
  return (
    <Screen testID={testID} maxWidth={460} main>
      <View style={styles.brand}>
        <Wordmark />
      </View>
      <Card>
        <AppText variant="title" role="heading" aria-level={1}>
          {title}
        </AppText>
        {intro ? <AppText muted>{intro}</AppText> : null}
        {children}
      </Card>
      {footer ? <View style={styles.footer}>{footer}</View> : null}
    </Screen>
  );
}

/** A quiet text link between signed-out screens. */
export function AuthLink({ href, label, testID }: { href: Href; label: string; testID?: string }) {
  return (
    <Link href={href} testID={testID} style={styles.link}>
      {label}
    </Link>
  );
}

const styles = StyleSheet.create({
  brand: { marginTop: space.xl, marginBottom: space.xs },
  footer: { alignItems: 'center', gap: space.sm },
  link: { color: colors.spruce, textDecorationLine: 'underline', fontFamily: 'AtkinsonHyperlegible_700Bold', fontSize: 15, paddingVertical: space.xs },
});
