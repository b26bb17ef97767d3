import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { GOVERNS, NOT_CERTIFIED } from '../../shared/deferral';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';


/** "Lifting: … Overhead work: …" → ["Lifting", "Overhead work"]: the hazards a caution names. */
export function cautionHazards(text: string): string[] {
  return [...text.matchAll(/(?:^|[.!]\s+)([A-Z][A-Za-z -]{2,30}):/g)].map((m) => m[1]!.trim());
}

/**
 * A catalogue item's caution (electrical, refrigerant, brazing, lifting, overhead work). Closed, it
 * names the hazards in one line (a unit check lists dozens of items); a tap reads it in full, with
 * the deferral to the manufacturer's manual, local codes and licensed practice.
 */
export function ItemCaution({ text, initiallyOpen = false, testID }: { text: string; initiallyOpen?: boolean; testID?: string }) {
  const [open, setOpen] = useState(initiallyOpen);
  const hazards = cautionHazards(text);
  const body = `${text.trim()}${/licensed practice/i.test(text) ? '' : ` ${GOVERNS}`} ${NOT_CERTIFIED}`;
  return (
    <View style={styles.box} testID={testID}>
      <Pressable
        accessibilityRole="button"
        accessibilityState={{ expanded: open }}
        testID={testID ? `${testID}-toggle` : undefined}
        onPress={() => setOpen((o) => !o)}
        style={styles.head}
      >
        <AppText variant="label" style={styles.title}>
          ⚠ Caution{hazards.length ? `: ${hazards.join(' · ')}` : ''}
        </AppText>
        <AppText variant="label" style={styles.toggle}>
          {open ? 'Hide ▴' : 'Read ▾'}
        </AppText>
      </Pressable>
      {open ? (
        <AppText variant="small" testID={testID ? `${testID}-text` : undefined} style={styles.body}>
          {body}
        </AppText>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { backgroundColor: colors.ochreSoft, borderLeftWidth: 4, borderLeftColor: colors.ochre, borderRadius: radius.md },
  head: { minHeight: touchTarget, flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm, paddingHorizontal: space.md },
  title: { color: '#5A3B00', flexShrink: 1 },
  toggle: { color: colors.spruce },
  body: { paddingHorizontal: space.md, paddingBottom: space.md },
});
