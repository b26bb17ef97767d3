import { Link, useRouter } from 'expo-router';
import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '../api/client';
import { isQueued } from '../outbox';
import { useCatalogueQuery } from '../queries/catalogue';
import { useJobCompaniesQuery } from '../queries/companies';
import { useUnitModelQuery, useUnitRecordQuery } from '../queries/checks';
import { useJobQuery } from '../queries/jobs';
import { useLevelsQuery } from '../queries/levels';
import { useSpacesQuery } from '../queries/spaces';
import { colors, linkTarget, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { limitResolverFor } from '../walk/measure';
import { FindingForm, type FindingTarget } from './FindingForm';
import { links, type NewFindingParams } from '../links';

export type { NewFindingParams };

/**
 * Log a finding on its own page: for a unit, or for a space or a level when the defect is not
 * about one unit (an unsealed wall penetration in a corridor).
 */
export function NewFindingScreen({ jobId, params }: { jobId: string; params: NewFindingParams }) {
  const router = useRouter();
  const job = useJobQuery(jobId);
  const unit = useUnitRecordQuery(jobId, params.unitId ?? '');
  const model = useUnitModelQuery(jobId, unit.data?.modelId);
  const levels = useLevelsQuery(jobId);
  const spaces = useSpacesQuery(jobId);
  // The form's lists start beside the screen's own reads (the unit's kind picks the defect types);
  // the whole catalogue only when the address names a defect type to open on.
  const formCatalogue = useCatalogueQuery(jobId, { unitKind: unit.data?.kind }, { enabled: !params.unitId || Boolean(unit.data) });
  const companies = useJobCompaniesQuery(jobId);
  const catalogue = useCatalogueQuery(jobId, {}, { enabled: Boolean(params.catalogueItemId) });
  const resolve = useMemo(() => limitResolverFor(model.data ?? null, job.data ?? null, unit.data ?? null), [model.data, job.data, unit.data]);

  const space_ = params.spaceId ? spaces.data?.find((s) => s.id === params.spaceId) : undefined;
  const level = levels.data?.find((l) => l.id === (params.levelId ?? unit.data?.levelId ?? space_?.levelId));
  const target: FindingTarget | null = params.unitId
    ? unit.data
      ? { unitId: unit.data.id, levelId: unit.data.levelId, spaceId: unit.data.spaceId, label: `Unit ${unit.data.tag}` }
      : null
    : params.spaceId
      ? space_
        ? { spaceId: space_.id, levelId: space_.levelId, label: `Space ${space_.name} · ${space_.levelName}` }
        : null
      : params.levelId && level
        ? { levelId: level.id, label: `Level ${level.name}` }
        : null;
  const item = params.catalogueItemId ? catalogue.data?.find((i) => i.id === params.catalogueItemId) : undefined;
  const wanted = [job, levels, spaces, formCatalogue, companies, ...(params.catalogueItemId ? [catalogue] : []), ...(params.unitId ? [unit] : [])];
  // Only a first load that failed: a refetch failing with no signal keeps what was shown.
  const failed = wanted.find((q) => q.isLoadingError);
  const pending = [...wanted, ...(unit.data?.modelId ? [model] : [])].some((q) => q.isPending);
  const back = level ? links.levelWalk(jobId, level.id) : links.findings(jobId);

  return (
    <Screen testID="new-finding-screen" maxWidth={640}>
      <Link href={back} style={styles.back} testID="new-finding-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← {level ? level.name : 'Findings'}
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Log a finding
        </AppText>
      </View>
      {failed ? (
        failed.error instanceof ApiError && failed.error.status === 404 ? (
          <EmptyState title="Not found" body="This job, unit or level does not exist, or you are not a member of the job." testID="new-finding-not-found" />
        ) : (
          <ErrorState message={failed.error?.message ?? ''} onRetry={() => void failed.refetch()} />
        )
      ) : pending ? (
        <LoadingState label="Loading…" />
      ) : !target ? (
        <EmptyState
          title="Where is the defect?"
          body="Open this form from a level's walk, a unit's check or a space, so the finding is attached to it."
          testID="new-finding-no-target"
        />
      ) : job.data?.role === 'subcontractor' ? (
        <EmptyState title="Inspectors log findings" body="Subcontractors see the findings assigned to their company and send fixes." testID="new-finding-not-allowed" />
      ) : (
        <FindingForm
          job={job.data!}
          target={target}
          item={item}
          unitKind={unit.data?.kind}
          lists={{ items: formCatalogue.data ?? [], companies: companies.data ?? [] }}
          measuredText={params.measuredText}
          walkId={params.walkId ?? null}
          resolve={resolve}
          onLogged={(f) => router.replace(isQueued(f) ? links.sync() : links.finding(jobId, f.id))}
          onCancel={() => router.replace(back)}
        />
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
});
