import { useState } from 'react';
import { Image, Modal, Pressable, StyleSheet, View } from 'react-native';
import { KeptImage } from '../kept/KeptImage';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';

export interface StripPhoto {
  key: string;
  /** Thumbnail shown in the strip. */
  thumbUri: string;
  /** Full image shown when enlarged. */
  fullUri: string;
  label: string;
}

/** Thumbnails in a wrapping row; tap one to see it large; an optional remove button under each. */
export function PhotoStrip({
  photos,
  onRemove,
  onMarkUp,
  testID = 'photos',
}: {
  photos: readonly StripPhoto[];
  onRemove?: (key: string) => void;
  /** Offers "Mark up" on the enlarged photo (components/photos/MarkupEditor.tsx). */
  onMarkUp?: (key: string) => void;
  testID?: string;
}) {
  const [open, setOpen] = useState<StripPhoto | null>(null);
  if (photos.length === 0) return null;
  return (
    <View style={styles.row} testID={testID}>
      {photos.map((p, i) => (
        <View key={p.key} style={styles.cell}>
          <Pressable
            accessibilityRole="button"
            accessibilityLabel={`Enlarge ${p.label}`}
            testID={`${testID}-thumb-${i}`}
            onPress={() => setOpen(p)}
            style={styles.thumbWrap}
          >
            <KeptImage uri={p.thumbUri} style={styles.thumb} resizeMode="cover" accessibilityLabel={p.label} />
          </Pressable>
          {onRemove ? (
            <Pressable
              accessibilityRole="button"
              accessibilityLabel={`Remove ${p.label}`}
              testID={`${testID}-remove-${i}`}
              onPress={() => onRemove(p.key)}
              style={styles.remove}
            >
              <AppText variant="label" style={{ color: colors.danger }}>
                Remove
              </AppText>
            </Pressable>
          ) : null}
        </View>
      ))}
      <Modal visible={open !== null} transparent animationType="none" onRequestClose={() => setOpen(null)}>
        <View style={styles.backdrop} testID={`${testID}-enlarged`}>
          {open ? <Image source={{ uri: open.fullUri }} style={styles.full} resizeMode="contain" accessibilityLabel={open.label} /> : null}
          {open && onMarkUp ? (
            <Button
              label="Mark up"
              tone="secondary"
              testID={`${testID}-enlarged-markup`}
              onPress={() => {
                setOpen(null);
                onMarkUp(open.key);
              }}
            />
          ) : null}
          <Button label="Close" tone="secondary" testID={`${testID}-enlarged-close`} onPress={() => setOpen(null)} />
        </View>
      </Modal>
    </View>
  );
}

const THUMB = 96;

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  cell: { alignItems: 'center', gap: 2 },
  thumbWrap: { borderRadius: radius.md, overflow: 'hidden', borderWidth: 1, borderColor: colors.line },
  thumb: { width: THUMB, height: THUMB, backgroundColor: colors.spruceSoft },
  remove: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.sm },
  backdrop: { flex: 1, backgroundColor: 'rgba(20,24,22,0.96)', alignItems: 'center', justifyContent: 'center', padding: space.lg, gap: space.lg },
  full: { width: '100%', flex: 1, maxWidth: 900 },
});
