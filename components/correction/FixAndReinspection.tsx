import { StyleSheet, View } from 'react-native';
import type { FindingEventDto, PhotoDto } from '../../shared/schemas/findings';
import { FIX_AND_REINSPECTION_WORDS as W, PHOTO_STAGE_LABELS } from '../../shared/words';
import { formatWhen } from '../findings/due';
import { PhotoStrip } from '../findings/PhotoStrip';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { latestFixPhotos, sideBySide } from './BeforeAfter';

/** The newest event of these kinds, or undefined. Events come oldest first. */
function latest(events: readonly FindingEventDto[], kinds: readonly FindingEventDto['kind'][]): FindingEventDto | undefined {
  return [...events].reverse().find((e) => kinds.includes(e.kind));
}

/** The new measurement an event carries ("28 in", pass, "Within the limit of …"), if any. */
export function eventMeasurement(e: FindingEventDto | undefined): { text: string; pass: boolean | null; verdict: string | null } | null {
  const to = e?.to;
  if (!to || typeof to.measuredText !== 'string') return null;
  return { text: to.measuredText, pass: typeof to.pass === 'boolean' ? to.pass : null, verdict: typeof to.verdict === 'string' ? to.verdict : null };
}

/**
 * The latest fix and the latest re-inspection side by side, each labelled with who and when, its
 * photos and its new measurement with the verdict against the finding's limit. Shown once a
 * re-inspection followed a fix, so the inspector's photo sits beside the fix it judged.
 */
export function FixAndReinspection({
  photos,
  events,
  label,
  timeZone,
  testID = 'fix-and-reinspection',
}: {
  photos: readonly PhotoDto[];
  events: readonly FindingEventDto[];
  label: string;
  timeZone: string;
  testID?: string;
}) {
  const fix = latest(events, ['fix_submitted']);
  const verdict = latest(events, ['accepted', 'returned']);
  if (!fix || !verdict || verdict.at < fix.at) return null;
  const byId = new Map(photos.map((p) => [p.id, p]));
  const reinspectionPhotos = verdict.photoIds.map((id) => byId.get(id)).filter((p): p is PhotoDto => p?.stage === 'reinspection');
  return (
    <View style={styles.section} testID={testID}>
      <AppText variant="title" role="heading">
        {W.heading}
      </AppText>
      <View style={sideBySide.row}>
        <Side
          title={W.fix}
          who={`${fix.actor.name}, ${formatWhen(fix.at, timeZone)}`}
          photos={latestFixPhotos(photos)}
          empty={W.noFixPhoto}
          photoLabel={`${label} ${PHOTO_STAGE_LABELS.fix.toLowerCase()}`}
          measured={eventMeasurement(fix)}
          testID={`${testID}-fix`}
        />
        <Side
          title={W.reinspection}
          who={`${verdict.actor.name}, ${formatWhen(verdict.at, timeZone)} · ${verdict.kind === 'accepted' ? 'accepted' : 'returned'}`}
          photos={reinspectionPhotos}
          empty={W.noReinspectionPhoto}
          photoLabel={`${label} ${PHOTO_STAGE_LABELS.reinspection.toLowerCase()}`}
          measured={eventMeasurement(verdict)}
          testID={`${testID}-reinspection`}
        />
      </View>
    </View>
  );
}

function Side({
  title,
  who,
  photos,
  empty,
  photoLabel,
  measured,
  testID,
}: {
  title: string;
  who: string;
  photos: readonly PhotoDto[];
  empty: string;
  photoLabel: string;
  measured: ReturnType<typeof eventMeasurement>;
  testID: string;
}) {
  return (
    <View style={sideBySide.side} testID={testID}>
      <AppText variant="label">{title}</AppText>
      <AppText variant="small" muted>
        {who}
      </AppText>
      {photos.length ? (
        <PhotoStrip
          testID={`${testID}-photos`}
          photos={photos.map((p, i) => ({ key: p.id, thumbUri: p.thumbUrl, fullUri: p.url, label: `${photoLabel} ${i + 1}` }))}
        />
      ) : (
        <AppText variant="small" muted>
          {empty}
        </AppText>
      )}
      {measured ? (
        <View style={[styles.measured, measured.pass === false ? styles.fail : measured.pass ? styles.pass : null]} testID={`${testID}-measured`}>
          <AppText variant="small">
            {W.newMeasurement}: {measured.text}
            {measured.pass === null ? '' : measured.pass ? ' ✓ pass' : ' ✗ fail'}
          </AppText>
          {measured.verdict ? <AppText variant="small">{measured.verdict}</AppText> : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  section: { gap: space.sm },
  measured: { borderRadius: radius.sm, padding: space.xs, borderLeftWidth: 3, borderLeftColor: colors.line },
  pass: { backgroundColor: colors.goodSoft, borderLeftColor: colors.good },
  fail: { backgroundColor: colors.dangerSoft, borderLeftColor: colors.danger },
});
