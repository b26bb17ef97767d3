import { StyleSheet, View } from 'react-native';
import { ApiError } from '../api/client';
import { useReadinessQuery } from '../queries/board';
import { useJobQuery } from '../queries/jobs';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { ReportActions } from '../reports/ReportActions';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { links } from '../links';
import { BackLink, BoardTabs } from './parts';
import { LevelReadinessCard, LooseUnitsCard, SystemReadinessCard } from './Readiness';

/**
 * Readiness: which systems are ready for startup (and what blocks each), which levels can close
 * their ceilings (and the findings that stop it). With `systemId`, one system (its screen).
 */
export function ReadinessScreen({ jobId, systemId }: { jobId: string; systemId?: string }) {
  const wide = useWide();
  const job = useJobQuery(jobId);
  const readiness = useReadinessQuery(jobId, systemId ? { systemId } : {});
  const data = readiness.data;
  const systems = data ? (systemId ? data.systems.filter((s) => s.systemId === systemId) : data.systems) : [];
  const readySystems = systems.filter((s) => s.startupReady ?? s.ready).length;
  const readyLevels = data ? data.levels.filter((l) => l.ceilingReady).length : 0;

  return (
    <Screen testID="readiness-screen" maxWidth={wide ? 1200 : 720}>
      {systemId ? (
        <BackLink href={links.readiness(jobId)} label="All systems and levels" testID="readiness-back" />
      ) : (
        <BackLink href={links.job(jobId)} label={job.data?.name ?? 'The job'} testID="readiness-back" />
      )}
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          {systemId && systems[0] ? `${systems[0].name}: readiness` : 'Readiness'}
        </AppText>
        <AppText muted>
          A unit is ready for startup when it has a complete unit check and no unresolved critical or major finding; a system when all its
          units are and its pressure test and evacuation passed and its charge is on record. A level can close its ceilings when every unit
          in or above the ceiling is checked (or excluded by a GC manager, with a reason), no unresolved finding on it needs access above
          the ceiling, every system on it has a passed, witnessed pressure test and every concealed unit a passed drain test.
        </AppText>
      </View>
      {systemId ? null : <BoardTabs jobId={jobId} role={job.data?.role} current="readiness" />}
      {systemId ? <ReportActions jobId={jobId} place={{ systemId }} what="of this system" testID="system-reports" /> : null}
      {data?.companyScope ? (
        <Notice tone="info" testID="readiness-company-scope">
          You see your company’s findings only: “ready” here means none of your company’s findings holds it back. Unit checks count for
          everyone.
        </Notice>
      ) : null}
      {readiness.isPending ? (
        <LoadingState label="Loading readiness…" />
      ) : readiness.isError ? (
        readiness.error instanceof ApiError && readiness.error.status === 404 ? (
          <EmptyState title="Not found" body="This job or system does not exist, or you are not a member of the job." testID="readiness-not-found" />
        ) : (
          <ErrorState message={readiness.error.message} onRetry={() => readiness.refetch()} />
        )
      ) : (
        <>
          <View style={styles.section} testID="readiness-systems">
            <AppText variant="title" role="heading">
              Systems: ready for startup
            </AppText>
            {systems.length === 0 ? (
              <AppText muted testID="readiness-no-systems">
                No systems on this job yet.
              </AppText>
            ) : (
              <>
                {systemId ? null : (
                  <AppText muted testID="readiness-systems-count">
                    {readySystems} of {systems.length} systems ready for startup.
                  </AppText>
                )}
                <View style={wide ? styles.gridWide : styles.grid}>
                  {systems.map((s) => (
                    <View key={s.systemId} style={wide ? styles.half : null}>
                      <SystemReadinessCard jobId={jobId} system={s} />
                    </View>
                  ))}
                </View>
              </>
            )}
            {systemId ? null : <LooseUnitsCard jobId={jobId} units={data!.unitsWithoutSystem} />}
          </View>
          {systemId ? null : (
            <View style={styles.section} testID="readiness-levels">
              <AppText variant="title" role="heading">
                Levels: ready to close ceilings
              </AppText>
              <AppText muted testID="readiness-levels-count">
                {readyLevels} of {data!.levels.length} levels can close their ceilings.
              </AppText>
              <View style={wide ? styles.gridWide : styles.grid}>
                {[...data!.levels]
                  .sort((a, b) => a.position - b.position)
                  .map((l) => (
                    <View key={l.levelId} style={wide ? styles.half : null}>
                      <LevelReadinessCard jobId={jobId} level={l} canExclude={job.data?.role === 'gc_manager'} timeZone={job.data?.timeZone} />
                    </View>
                  ))}
              </View>
            </View>
          )}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.xs },
  section: { gap: space.md },
  grid: { gap: space.md },
  gridWide: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-start', columnGap: '2%', rowGap: space.md },
  half: { width: '49%' },
});
