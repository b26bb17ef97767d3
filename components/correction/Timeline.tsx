import { StyleSheet, View } from 'react-native';
import type { FindingEventDto, FindingEventKind, PhotoDto } from '../../shared/schemas/findings';
import { FINDING_STATUS_LABELS, PHOTO_STAGE_LABELS, SEVERITY_LABELS, type FindingStatus, type Severity } from '../../shared/words';
import { formatDay, formatWhen } from '../findings/due';
import { PhotoStrip } from '../findings/PhotoStrip';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';

export const EVENT_WORDS: Record<FindingEventKind, string> = {
  logged: 'Logged',
  fix_submitted: 'Fix submitted',
  accepted: 'Re-inspected: accepted',
  returned: 'Re-inspected: returned',
  closed_on_walk: 'Closed on a walk',
  voided: 'Voided',
  reopened: 'Reopened',
  reassigned: 'Reassigned',
  severity_changed: 'Severity changed',
  due_changed: 'Due date changed',
  comment: 'Comment',
  photo_added: 'Photo added',
};

/** The fields an event may carry, in words; ids are left out (their names are carried beside them). */
const FIELD_WORDS: Record<string, string> = {
  status: 'Status',
  severity: 'Severity',
  companyName: 'Company',
  dueOn: 'Due',
  backdated: 'Before today',
  daysToFix: 'Days to fix',
  measuredText: 'Measured',
  pass: 'Measured result',
  verdict: 'Against the rule',
  photoCount: 'Photos of the defect',
  note: 'Note',
  returnCount: 'Returns',
};

/** The order fields are told in (the database keeps JSON keys in its own order). */
const ORDER = Object.keys(FIELD_WORDS);

function word(k: string, v: unknown): string {
  if (v === null || v === undefined || v === '') return '—';
  if (k === 'status' && typeof v === 'string') return FINDING_STATUS_LABELS[v as FindingStatus] ?? v;
  if (k === 'severity' && typeof v === 'string') return SEVERITY_LABELS[v as Severity] ?? v;
  if (k === 'dueOn' && typeof v === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(v)) return formatDay(v);
  if (k === 'pass' && typeof v === 'boolean') return v ? 'pass' : 'fail';
  if (k === 'backdated' && v === true) return 'back-dated on purpose by a GC manager';
  return typeof v === 'object' ? JSON.stringify(v) : String(v);
}

/** A change's "what" in words: "Status: Open → Fix submitted; Company: …". */
export function describeChange(e: Pick<FindingEventDto, 'from' | 'to'>): string | null {
  const keys = [...new Set([...Object.keys(e.from ?? {}), ...Object.keys(e.to ?? {})])]
    .filter((k) => k in FIELD_WORDS)
    .sort((a, b) => ORDER.indexOf(a) - ORDER.indexOf(b));
  const parts = keys.map((k) => {
    const label = FIELD_WORDS[k]!;
    const had = e.from !== null && k in e.from;
    const has = e.to !== null && k in e.to;
    if (had && has) return e.from![k] === e.to![k] ? null : `${label}: ${word(k, e.from![k])} → ${word(k, e.to![k])}`;
    return `${label}: ${word(k, has ? e.to![k] : e.from![k])}`;
  });
  const said = parts.filter((p): p is string => p !== null);
  return said.length ? said.join('; ') : null;
}

/**
 * Every event of a finding, oldest first: who, when, what changed, the reason and the photos sent
 * with it. Events are never edited or deleted, so this is the finding's evidence.
 */
export function Timeline({
  events,
  photos,
  timeZone,
  testID = 'finding-history',
}: {
  events: readonly FindingEventDto[];
  photos: readonly PhotoDto[];
  timeZone: string;
  testID?: string;
}) {
  const byId = new Map(photos.map((p) => [p.id, p]));
  const shown = events.filter((e) => e.kind !== 'comment');
  return (
    <View style={styles.section} testID={testID}>
      <AppText variant="title" role="heading">
        History
      </AppText>
      {shown.length === 0 ? (
        <AppText muted testID={`${testID}-empty`}>
          No changes recorded.
        </AppText>
      ) : (
        shown.map((e, i) => {
          const what = describeChange(e);
          const pics = e.photoIds.map((id) => byId.get(id)).filter((p): p is PhotoDto => p !== undefined);
          return (
            <View key={e.id} style={[styles.event, e.kind === 'returned' ? styles.returned : e.kind === 'accepted' ? styles.accepted : null]} testID={`finding-event-${e.kind}`}>
              <View style={styles.top}>
                <AppText variant="label" testID={`${testID}-kind-${i}`}>
                  {EVENT_WORDS[e.kind] ?? e.kind}
                </AppText>
              </View>
              <AppText variant="small" muted>
                {formatWhen(e.at, timeZone)} · {e.actor.name}
              </AppText>
              {what ? <AppText variant="small">{what}</AppText> : null}
              {e.reason ? (
                <AppText variant="small" testID={`${testID}-reason-${i}`}>
                  {e.kind === 'returned' ? 'Why: ' : e.kind === 'fix_submitted' || e.kind === 'photo_added' ? 'Note: ' : ''}“{e.reason}”
                </AppText>
              ) : null}
              {pics.length ? (
                <PhotoStrip
                  testID={`${testID}-photos-${i}`}
                  photos={pics.map((p, n) => ({ key: p.id, thumbUri: p.thumbUrl, fullUri: p.url, label: `${EVENT_WORDS[e.kind]}: ${PHOTO_STAGE_LABELS[p.stage] ?? 'photo'} ${n + 1}` }))}
                />
              ) : e.photoIds.length ? (
                <AppText variant="small" muted>
                  {e.photoIds.length} photo{e.photoIds.length === 1 ? '' : 's'}
                </AppText>
              ) : null}
            </View>
          );
        })
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  section: { gap: space.sm },
  event: { borderLeftWidth: 3, borderLeftColor: colors.spruce, paddingLeft: space.md, paddingVertical: space.xs, gap: 2 },
  returned: { borderLeftColor: colors.danger },
  accepted: { borderLeftColor: colors.good },
  top: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
});
