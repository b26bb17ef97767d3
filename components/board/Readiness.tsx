import { Link, type Href } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { LevelReadiness, ReadinessBlocker, SystemReadiness, UnitReadiness } from '../../shared/schemas/board';
import type { LevelTestReadiness, SystemTestReadiness, TestBlocker } from '../../shared/schemas/testRecords';
import { FINDING_STATUS_LABELS } from '../../shared/words';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { SeverityMark } from '../walk/SeverityMark';
import { links } from '../links';
import { StartupBadge } from './parts';
import { CeilingVerdict } from './CeilingVerdict';
import { ExcludedCeilingUnitRow, UncheckedCeilingUnit } from './CeilingExclusions';

const SHOWN = 6;

const TEST_WORDS: Record<TestBlocker['kind'], string> = {
  pressure: 'Pressure test',
  evacuation: 'Evacuation',
  charge: 'Refrigerant charge',
  drain: 'Drain test',
  startup: 'Start-up record',
};
const TEST_STATE_WORDS: Record<TestBlocker['state'], string> = {
  missing: 'not on record',
  failed: 'failed',
  awaiting_witness: 'passed, waiting for a witness',
};

const TAGS_IN_LINE = 6;

/** One line of what a level or system waits for, with the test blockers it stands for. */
export interface TestBlockerLine {
  text: string;
  blockers: TestBlocker[];
}

/**
 * The test records waited for, one line each: per system ("Pressure test of VRF-1: passed,
 * waiting for a witness"), and the units' records grouped by kind and state so that forty
 * missing drain tests are one line ("Drain test not on record: 40 units, IU-3-01, … and 34 more").
 */
export function testBlockerGroups(blockers: readonly TestBlocker[]): TestBlockerLine[] {
  const groups = new Map<string, { first: TestBlocker; tags: string[]; all: TestBlocker[] }>();
  for (const b of blockers) {
    const key = b.unitTag ? `${b.kind}|${b.state}|units` : `${b.kind}|${b.state}|${b.systemId ?? ''}|${b.levelId ?? ''}`;
    const g = groups.get(key) ?? { first: b, tags: [], all: [] };
    if (b.unitTag) g.tags.push(b.unitTag);
    g.all.push(b);
    groups.set(key, g);
  }
  return [...groups.values()].map(({ first: b, tags, all }) => {
    const what = TEST_WORDS[b.kind] ?? b.kind;
    const state = TEST_STATE_WORDS[b.state] ?? b.state;
    if (tags.length === 0) return { text: `${what}${b.systemName ? ` of ${b.systemName}` : ''}: ${state}`, blockers: all };
    if (tags.length === 1) return { text: `${what} of unit ${tags[0]}: ${state}`, blockers: all };
    const shown = tags.slice(0, TAGS_IN_LINE).join(', ');
    const more = tags.length > TAGS_IN_LINE ? ` and ${tags.length - TAGS_IN_LINE} more` : '';
    return { text: `${what}, ${state}: ${tags.length} units, ${shown}${more}`, blockers: all };
  });
}

export function testBlockerLines(blockers: readonly TestBlocker[]): string[] {
  return testBlockerGroups(blockers).map((g) => g.text);
}

/**
 * Where a line leads: a missing record to its form (one system or unit; several units of a level:
 * the form offers that level's units), a failed or unwitnessed one to the record itself (several:
 * the list of them).
 */
export function testBlockerHref(jobId: string, line: TestBlockerLine, levelId?: string): Href {
  const [b, ...rest] = line.blockers;
  if (!b) return links.tests(jobId);
  if (rest.length === 0) {
    if (b.state !== 'missing' && b.recordId) return links.testRecord(jobId, b.recordId);
    return links.newTestRecord(jobId, b.unitId ? { kind: b.kind, unitId: b.unitId } : { kind: b.kind, systemId: b.systemId ?? undefined });
  }
  if (b.state === 'missing') return links.newTestRecord(jobId, { kind: b.kind, levelId: b.levelId ?? levelId });
  return links.tests(jobId, { kind: b.kind, current: 'true', ...(b.state === 'failed' ? { result: 'failed' } : { witnessed: 'false' }) });
}

/** The test records a level or a system waits for, under the rule they hold back; each line links to what settles it. */
export function TestBlockers({
  jobId,
  rule,
  blockers,
  levelId,
  testID,
}: {
  jobId: string;
  rule: string;
  blockers: readonly TestBlocker[] | undefined;
  /** The level the card is about: several units' missing records open the form on its units. */
  levelId?: string;
  testID: string;
}) {
  if (!blockers || blockers.length === 0) return null;
  return (
    <View style={styles.units} testID={testID}>
      <AppText variant="label">{rule}</AppText>
      {testBlockerGroups(blockers).map((line, i) => (
        <Link key={line.text} href={testBlockerHref(jobId, line, levelId)} asChild>
          <Pressable style={styles.testLine} accessibilityRole="link" testID={`${testID}-${i}`}>
            <AppText variant="small" style={styles.link}>{`• ${line.text}`}</AppText>
          </Pressable>
        </Link>
      ))}
    </View>
  );
}

/** A finding that holds something back, as a link to it. */
export function BlockerRow({ jobId, blocker, testID }: { jobId: string; blocker: ReadinessBlocker; testID?: string }) {
  const b = blocker;
  return (
    <Link href={links.finding(jobId, b.findingId)} asChild>
      <Pressable style={styles.blocker} testID={testID ?? `blocker-${b.number}`} accessibilityRole="link">
        <SeverityMark severity={b.severity} />
        <View style={styles.blockerText}>
          <AppText variant="label" style={styles.link}>
            #{b.number} · {b.code} {b.title}
          </AppText>
          <AppText variant="small" muted>
            {[b.unitTag, FINDING_STATUS_LABELS[b.status]].filter(Boolean).join(' · ')}
          </AppText>
        </View>
      </Pressable>
    </Link>
  );
}

const TAGS_SHOWN = 12;

/**
 * What keeps units from startup, the actionable part first: each blocking finding (with its
 * unit), then the units without a complete unit check, as one list of tags.
 */
export function UnitsNotReady({ jobId, units, testID }: { jobId: string; units: readonly UnitReadiness[]; testID: string }) {
  const [all, setAll] = useState(false);
  const [allTags, setAllTags] = useState(false);
  const blockers = units.flatMap((u) => u.blockers);
  // The server lists a unit's first few blockers; blockersTotal says how many there are in all.
  const notListed = units.reduce((n, u) => n + (u.blockersTotal ?? u.blockers.length) - u.blockers.length, 0);
  const unchecked = units.filter((u) => !u.checked).map((u) => u.tag);
  if (blockers.length === 0 && unchecked.length === 0) return null;
  const shown = all ? blockers : blockers.slice(0, SHOWN);
  const tags = allTags ? unchecked : unchecked.slice(0, TAGS_SHOWN);
  return (
    <View style={styles.units} testID={testID}>
      {blockers.length > 0 ? (
        <>
          <AppText variant="label">Unresolved critical or major findings</AppText>
          {shown.map((b) => (
            <BlockerRow key={b.findingId} jobId={jobId} blocker={b} />
          ))}
          {blockers.length > SHOWN ? (
            <Button tone="quiet" label={all ? 'Show fewer' : `Show all ${blockers.length} findings`} onPress={() => setAll((a) => !a)} testID={`${testID}-all`} />
          ) : null}
          {notListed > 0 && (all || blockers.length <= SHOWN) ? (
            <AppText variant="small" muted testID={`${testID}-more`}>
              and {notListed} more (see each unit's findings)
            </AppText>
          ) : null}
        </>
      ) : null}
      {unchecked.length > 0 ? (
        <View style={styles.unchecked} testID={`${testID}-unchecked`}>
          <AppText variant="label">
            No complete unit check yet ({unchecked.length} unit{unchecked.length === 1 ? '' : 's'})
          </AppText>
          <AppText variant="small" muted>
            {tags.join(', ')}
            {unchecked.length > tags.length ? ' …' : ''}
          </AppText>
          {unchecked.length > TAGS_SHOWN ? (
            <Button tone="quiet" label={allTags ? 'Show fewer' : `Show all ${unchecked.length}`} onPress={() => setAllTags((a) => !a)} testID={`${testID}-tags`} />
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

/** A system: ready for startup when every unit on it is (checked, no unresolved critical or major finding). */
export function SystemReadinessCard({ jobId, system }: { jobId: string; system: SystemReadiness & Partial<SystemTestReadiness> }) {
  const s = system;
  // With test records in the answer, a system is ready for startup only when they are too.
  const ready = s.startupReady ?? s.ready;
  const blockers = s.units.reduce((n, u) => n + (u.blockersTotal ?? u.blockers.length), 0);
  return (
    <Card testID={`system-readiness-${s.systemId}`}>
      <View style={styles.top}>
        <Link href={links.readiness(jobId, s.systemId)} testID={`system-link-${s.systemId}`}>
          <AppText variant="title" style={styles.link}>
            {s.name}
          </AppText>
        </Link>
        <StartupBadge ready={ready} testID={`system-ready-${s.systemId}`} />
      </View>
      <AppText variant="small" muted>
        {s.unitsTotal === 0
          ? 'No units on this system yet.'
          : `${s.unitsReady} of ${s.unitsTotal} ${s.unitsTotal === 1 ? 'unit' : 'units'} ready · ${s.unitsUnchecked} not checked · ${blockers} blocking finding${blockers === 1 ? '' : 's'}`}
      </AppText>
      <UnitsNotReady jobId={jobId} units={s.units} testID={`system-blocks-${s.systemId}`} />
      <Link href={links.tests(jobId, { systemId: s.systemId })} style={linkTarget} testID={`system-tests-link-${s.systemId}`}>
        <AppText variant="small" style={styles.link}>
          Test records of {s.name} →
        </AppText>
      </Link>
      <TestBlockers
        jobId={jobId}
        rule="Rule: before startup, a passed pressure test, a passed evacuation and the charge on record"
        blockers={s.startupBlockers}
        testID={`system-tests-${s.systemId}`}
      />
      {s.accepted !== undefined ? (
        s.accepted ? (
          <AppText variant="small" testID={`system-accepted-${s.systemId}`}>
            Accepted: start-up record passed and every unit's drain test passed.
          </AppText>
        ) : (
          <TestBlockers
            jobId={jobId}
            rule="Rule: to accept the system, a passed start-up record and every unit's drain test"
            blockers={s.acceptanceBlockers}
            testID={`system-acceptance-${s.systemId}`}
          />
        )
      ) : null}
    </Card>
  );
}

/**
 * A level: ready to close its ceilings when every unit in or above the ceiling is checked (or
 * excluded by a GC manager, with a reason) and no unresolved finding on it needs access above the
 * ceiling; each blocker under the rule it breaks. `canExclude` (a GC manager) offers "Exclude from
 * the ceiling rule" on each unchecked unit and "Count it again" on each excluded one.
 */
export function LevelReadinessCard({
  jobId,
  level,
  linkName = true,
  title,
  canExclude = false,
  timeZone = 'UTC',
}: {
  jobId: string;
  level: LevelReadiness & Partial<LevelTestReadiness>;
  linkName?: boolean;
  title?: string;
  canExclude?: boolean;
  timeZone?: string;
}) {
  const l = level;
  const name = (
    <AppText variant="title" style={linkName ? styles.link : null}>
      {title ?? l.name}
    </AppText>
  );
  return (
    <Card testID={`level-readiness-${l.levelId}`}>
      <View style={styles.top}>
        {linkName ? (
          <Link href={links.level(jobId, l.levelId)} testID={`level-link-${l.levelId}`}>
            {name}
          </Link>
        ) : (
          name
        )}
        <CeilingVerdict
          state={l.ceilingState}
          blockers={l.blockersTotal ?? l.blockers.length}
          unchecked={l.ceilingUnitsUnchecked}
          excluded={l.ceilingUnitsExcluded}
          tests={l.testBlockers?.length ?? 0}
          testID={`level-ceiling-${l.levelId}`}
        />
      </View>
      {title ? null : (
        <AppText variant="small" muted>
          {l.unitsReady} of {l.unitsTotal} {l.unitsTotal === 1 ? 'unit' : 'units'} ready for startup
        </AppText>
      )}
      {l.ceilingState === 'no_ceiling_units' ? (
        <AppText variant="small" muted testID={`level-ceiling-none-${l.levelId}`}>
          No unit on this level sits in or above the ceiling, so there is nothing to check before closing it.
        </AppText>
      ) : (
        <AppText variant="small" muted testID={`level-ceiling-units-${l.levelId}`}>
          {l.ceilingUnits - l.ceilingUnitsUnchecked - l.ceilingUnitsExcluded} of {l.ceilingUnits} {l.ceilingUnits === 1 ? 'unit' : 'units'} in or above the ceiling checked
          {l.ceilingUnitsExcluded > 0 ? ` · ${l.ceilingUnitsExcluded} excluded by a GC manager` : ''}
        </AppText>
      )}
      {l.ceilingUnitsUnchecked > 0 || l.ceilingUnitsExcluded > 0 ? (
        <View style={styles.units} testID={`level-unchecked-${l.levelId}`}>
          <AppText variant="label">Rule: every unit in or above the ceiling is checked first (or excluded by a GC manager, with a reason)</AppText>
          {l.ceilingUnitsUnchecked > 0 ? (
            canExclude ? (
              <>
                <AppText variant="small">Not checked yet:</AppText>
                {l.uncheckedCeilingUnits.map((u) => (
                  <UncheckedCeilingUnit key={u.unitId} jobId={jobId} unit={u} canExclude />
                ))}
                {l.ceilingUnitsUnchecked > l.uncheckedCeilingUnits.length ? (
                  <AppText variant="small" muted>
                    and {l.ceilingUnitsUnchecked - l.uncheckedCeilingUnits.length} more
                  </AppText>
                ) : null}
              </>
            ) : (
              <AppText variant="small">
                Not checked yet: {l.uncheckedCeilingUnits.map((u) => u.tag).join(', ')}
                {l.ceilingUnitsUnchecked > l.uncheckedCeilingUnits.length ? ` and ${l.ceilingUnitsUnchecked - l.uncheckedCeilingUnits.length} more` : ''}
              </AppText>
            )
          ) : null}
          {l.ceilingUnitsExcluded > 0 ? (
            <View style={styles.units} testID={`level-excluded-${l.levelId}`}>
              <AppText variant="small">Excluded from the rule by a GC manager:</AppText>
              {l.excludedCeilingUnits.map((u) => (
                <ExcludedCeilingUnitRow key={u.unitId} jobId={jobId} unit={u} timeZone={timeZone} canExclude={canExclude} />
              ))}
              {l.ceilingUnitsExcluded > l.excludedCeilingUnits.length ? (
                <AppText variant="small" muted>
                  and {l.ceilingUnitsExcluded - l.excludedCeilingUnits.length} more
                </AppText>
              ) : null}
            </View>
          ) : null}
        </View>
      ) : null}
      {l.blockers.length > 0 ? (
        <View style={styles.units}>
          <AppText variant="label">Rule: no unresolved finding needs access above the ceiling</AppText>
          {l.blockers.map((b) => (
            <BlockerRow key={b.findingId} jobId={jobId} blocker={b} />
          ))}
          {l.blockersTotal !== undefined && l.blockersTotal > l.blockers.length ? (
            <AppText variant="small" muted testID={`level-blockers-more-${l.levelId}`}>
              and {l.blockersTotal - l.blockers.length} more
            </AppText>
          ) : null}
        </View>
      ) : null}
      <TestBlockers
        jobId={jobId}
        levelId={l.levelId}
        rule="Rule: a passed, witnessed pressure test for every system on the level, and a passed drain test for every concealed unit"
        blockers={l.testBlockers}
        testID={`level-tests-${l.levelId}`}
      />
    </Card>
  );
}

/** Units not on any system: still judged for startup. */
export function LooseUnitsCard({ jobId, units }: { jobId: string; units: readonly UnitReadiness[] }) {
  if (units.length === 0) return null;
  const ready = units.filter((u) => u.ready).length;
  return (
    <Card testID="units-without-system">
      <AppText variant="title">Units not on a system</AppText>
      <AppText variant="small" muted>
        {ready} of {units.length} ready for startup
      </AppText>
      <UnitsNotReady jobId={jobId} units={units} testID="loose-blocks" />
    </Card>
  );
}

const styles = StyleSheet.create({
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', flexWrap: 'wrap', gap: space.sm },
  link: { color: colors.spruce, textDecorationLine: 'underline' },
  units: { gap: space.sm, marginTop: space.xs },
  // A whole touch target per line, the words in its middle.
  testLine: { minHeight: 44, justifyContent: 'center', alignSelf: 'flex-start' },
  unchecked: { gap: 2, alignItems: 'flex-start' },
  blocker: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.sm,
    flexWrap: 'wrap',
    minHeight: 44,
    padding: space.xs,
    borderRadius: radius.sm,
    backgroundColor: colors.paper,
  },
  blockerText: { flexShrink: 1, minWidth: 0 },
});
