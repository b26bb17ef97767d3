/**
 * "Waiting to send" where queued work appears: on a unit (its check, findings logged on it) and on
 * a level's walk (the findings and checks kept on this phone). Nothing queued is shown as if it
 * were on the server: these say it is on the phone, and link to the sync screen.
 */
import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { links } from '../links';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { useWaitingItems } from './index';
import type { OutboxItem } from './storage';

/** The unit a kept write is about: a unit check's unit, or the unit a new finding is logged on. */
export function itemUnitId(item: OutboxItem): string | null {
  if (item.record?.startsWith('unit:')) return item.record.slice('unit:'.length);
  if (item.kind !== 'finding') return null;
  const body = item.write.body;
  let json: unknown = null;
  if (body.kind === 'json') json = body.value;
  if (body.kind === 'form') {
    const data = body.fields.find((f) => f.name === 'data')?.value;
    try {
      json = data ? JSON.parse(data) : null;
    } catch {
      json = null;
    }
  }
  const unitId = (json as { unitId?: unknown } | null)?.unitId;
  return typeof unitId === 'string' ? unitId : null;
}

function countWords(items: readonly OutboxItem[]): string {
  const checks = items.filter((i) => i.kind === 'check').length;
  const findings = items.filter((i) => i.kind === 'finding').length;
  const other = items.length - checks - findings;
  const parts = [
    checks ? `${checks} unit check${checks === 1 ? '' : 's'}` : '',
    findings ? `${findings} finding${findings === 1 ? '' : 's'}` : '',
    other ? `${other} change${other === 1 ? '' : 's'}` : '',
  ].filter(Boolean);
  return parts.join(', ');
}

const STATE_WORDS: Record<OutboxItem['state'], string> = { waiting: 'waiting to send', sending: 'sending', attention: 'needs attention' };

/**
 * The words after saving a unit check: "saved" once it is on the server, "saved on this phone,
 * waiting to send" while it is kept in the outbox (nothing pretends to be on the server).
 */
export function useSavedCheckWords(jobId: string, tag: string | undefined): string {
  const waiting = useWaitingItems(jobId).some((i) => i.kind === 'check' && tag !== undefined && i.label.endsWith(`Unit ${tag}`));
  return waiting ? `Unit check of ${tag} saved on this phone, waiting to send.` : `Unit check of ${tag} saved.`;
}

/** A unit's kept work: "Waiting to send: 1 unit check, 2 findings". Nothing when there is none. */
export function UnitWaiting({ jobId, unitId, testID }: { jobId: string; unitId: string; testID?: string }) {
  const mine = useWaitingItems(jobId).filter((i) => itemUnitId(i) === unitId);
  if (mine.length === 0) return null;
  const attention = mine.some((i) => i.state === 'attention');
  return (
    <AppText variant="label" style={[styles.mark, attention && styles.attention]} testID={testID}>
      {attention ? 'Needs attention' : 'Waiting to send'}: {countWords(mine)}
    </AppText>
  );
}

/**
 * The level walk's kept work: each new finding and unit check on its units still on the phone,
 * with its state, and a link to the sync screen.
 */
export function LevelWaiting({ jobId, unitTags }: { jobId: string; unitTags: ReadonlyMap<string, string> }) {
  const mine = useWaitingItems(jobId).filter((i) => {
    const u = itemUnitId(i);
    return u !== null && unitTags.has(u);
  });
  if (mine.length === 0) return null;
  return (
    <View style={styles.card} testID="level-walk-waiting">
      <AppText variant="heading" role="heading">
        On this phone, not sent yet
      </AppText>
      {mine.map((i) => (
        <AppText key={i.id} variant="small" testID={`level-walk-waiting-${i.kind}`}>
          {i.kind === 'finding' ? 'New finding' : 'Unit check'} · unit {unitTags.get(itemUnitId(i) ?? '') ?? ''} · {STATE_WORDS[i.state]}
        </AppText>
      ))}
      <Link href={links.sync()} style={styles.link} accessibilityLabel={`Waiting to send (${mine.length}): open the list`} testID="level-walk-waiting-link">
        <AppText variant="label" style={styles.linkText}>
          Waiting to send ({mine.length})
        </AppText>
      </Link>
    </View>
  );
}

const styles = StyleSheet.create({
  mark: { color: '#5A3B00', backgroundColor: colors.ochreSoft, alignSelf: 'flex-start', paddingHorizontal: space.sm, paddingVertical: 2, borderRadius: radius.sm },
  attention: { color: colors.danger, backgroundColor: colors.dangerSoft },
  card: {
    gap: space.xs,
    backgroundColor: colors.ochreSoft,
    borderRadius: radius.md,
    borderLeftWidth: 4,
    borderLeftColor: colors.ochre,
    padding: space.md,
  },
  link: { minHeight: touchTarget, justifyContent: 'center', display: 'flex', alignItems: 'center', alignSelf: 'flex-start' },
  linkText: { color: colors.spruce, textDecorationLine: 'underline' },
});
