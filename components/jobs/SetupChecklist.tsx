import { useQuery } from '@tanstack/react-query';
import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { SetupCheckKey, SetupCheckLine, SetupChecklist as Checklist } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { jobPath } from '../api/lists';
import { links } from '../links';
import { setupKeys } from '../queries/setupKeys';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** One line's words: what is missing, how many, and the first few by name. */
export function checklistWords(line: SetupCheckLine): string {
  const names = line.examples.length > 0 ? `: ${line.examples.join(', ')}${line.count > line.examples.length ? ', …' : ''}` : '';
  const words: Record<SetupCheckKey, () => string> = {
    no_levels: () => 'No levels yet: add the building’s floors',
    no_units: () => 'No units yet: add them one by one or import the schedule',
    levels_without_spaces: () => `${plural(line.count, 'level has', 'levels have')} no spaces${names}`,
    spaces_without_size: () => `${plural(line.count, 'space served by a system needs', 'spaces served by a system need')} floor area and ceiling height for the refrigerant check${names}`,
    systems_without_charge: () => `${plural(line.count, 'system has', 'systems have')} no refrigerant charge${names}`,
    systems_without_limit: () => `${plural(line.count, 'system needs', 'systems need')} a concentration limit with its source${names}`,
    units_without_space: () => `${plural(line.count, 'unit is', 'units are')} in no space${names}`,
    units_without_system: () => `${plural(line.count, 'unit is', 'units are')} on no system${names}`,
    models_without_limits: () => `${plural(line.count, 'model has', 'models have')} no limits from its manual${names}`,
    pending_invitations: () => `${plural(line.count, 'invitation is', 'invitations are')} not accepted yet${names}`,
  };
  return words[line.key]();
}

/**
 * A GC manager's list of what is missing before a walk makes sense, on the job's home; each line a
 * link to the set-up section that fixes it. Hidden once everything is set.
 */
export function SetupChecklist({ jobId }: { jobId: string }) {
  const list = useQuery({
    queryKey: [...setupKeys.job(jobId), 'checklist'],
    queryFn: () => apiGet<Checklist>(jobPath(jobId, 'setup', 'checklist')),
  });
  if (!list.data || list.data.complete) return null;
  return (
    <Card testID="setup-checklist">
      <AppText variant="title" role="heading" aria-level={2}>
        Before the first walk
      </AppText>
      <AppText muted>What the job still misses. Each line opens the set-up page that fixes it.</AppText>
      <View style={styles.lines}>
        {list.data.lines.map((line) => (
          <Link key={line.key} href={links.setup(jobId, line.section)} asChild>
            <Pressable accessibilityRole="link" style={styles.line} testID={`setup-checklist-${line.key}`}>
              <AppText style={styles.box} aria-hidden>
                ○
              </AppText>
              <AppText style={styles.text}>{checklistWords(line)} →</AppText>
            </Pressable>
          </Link>
        ))}
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  lines: { gap: space.xs },
  line: { flexDirection: 'row', gap: space.sm, alignItems: 'center', minHeight: touchTarget, paddingHorizontal: space.sm, borderRadius: radius.sm, backgroundColor: colors.ochreSoft },
  box: { color: colors.ink },
  text: { flex: 1, color: colors.spruce, textDecorationLine: 'underline' },
});
