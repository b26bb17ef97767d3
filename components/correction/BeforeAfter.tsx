import { StyleSheet, View } from 'react-native';
import type { PhotoDto } from '../../shared/schemas/findings';
import { PhotoStrip } from '../findings/PhotoStrip';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';

/** The photos of the latest fix (the fix id of the newest fix photo), or none. */
export function latestFixPhotos(photos: readonly PhotoDto[]): PhotoDto[] {
  const fixPhotos = photos.filter((p) => p.fixId !== null);
  if (fixPhotos.length === 0) return [];
  const newest = fixPhotos.reduce((a, b) => (b.createdAt > a.createdAt ? b : a));
  return fixPhotos.filter((p) => p.fixId === newest.fixId);
}

/** Before and after, side by side: the finding's photos as logged and the latest fix's photos. */
export function BeforeAfter({
  before,
  after,
  label,
  testID = 'before-after',
}: {
  before: readonly PhotoDto[];
  after: readonly PhotoDto[];
  label: string;
  testID?: string;
}) {
  return (
    <View style={styles.row} testID={testID}>
      <Side title="Before (as logged)" photos={before} empty="No photo was logged." label={`${label} as logged`} testID={`${testID}-before`} />
      <Side title="After (latest fix)" photos={after} empty="No fix photo yet." label={`${label} fix`} testID={`${testID}-after`} />
    </View>
  );
}

function Side({ title, photos, empty, label, testID }: { title: string; photos: readonly PhotoDto[]; empty: string; label: string; testID: string }) {
  return (
    <View style={styles.side} testID={testID}>
      <AppText variant="label">{title}</AppText>
      {photos.length ? (
        <PhotoStrip
          testID={`${testID}-photos`}
          photos={photos.map((p, i) => ({ key: p.id, thumbUri: p.thumbUrl, fullUri: p.url, label: `${label}, photo ${i + 1}` }))}
        />
      ) : (
        <AppText variant="small" muted>
          {empty}
        </AppText>
      )}
    </View>
  );
}

/** Two panels side by side (before / after, fix / re-inspection), each half the width. */
export const sideBySide = StyleSheet.create({
  row: { flexDirection: 'row', gap: space.sm },
  side: {
    flex: 1,
    minWidth: 0,
    gap: space.xs,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.md,
    padding: space.sm,
  },
});
const styles = sideBySide;
