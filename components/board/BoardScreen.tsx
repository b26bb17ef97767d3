import { StyleSheet, View } from 'react-native';
import { ApiError } from '../api/client';
import { formatDay } from '../findings/due';
import { useBoardQuery, useFloorSystemsQuery, useRecurringQuery, useTrendQuery } from '../queries/board';
import { useJobQuery } from '../queries/jobs';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { useWide } from '../ui/useWide';
import { BoardCards } from './BoardCards';
import { BoardGrid } from './BoardGrid';
import { links, type BoardView } from '../links';
import { Tabs } from '../ui/Tabs';
import { BuildingStack } from './BuildingStack';
import { BackLink, BoardTabs } from './parts';
import { RecurringList } from './RecurringList';
import { TrendChart } from './TrendChart';
import { usePointerWords } from '../ui/usePointerWords';

/**
 * The levels board: the GC's first look at a job. First the building, a stack of floors (roof on
 * top) with each floor's coverage, open findings and readiness in words; one tap away, the table:
 * on a wide screen a grid of levels against counts, on a phone a card per level. Then open
 * findings over time, and the recurring defects.
 */
export function BoardScreen({ jobId, view = 'building' }: { jobId: string; view?: BoardView }) {
  const wide = useWide();
  const systems = useFloorSystemsQuery(jobId, view === 'building');
  const { Press } = usePointerWords();
  const job = useJobQuery(jobId);
  const board = useBoardQuery(jobId);
  const trend = useTrendQuery(jobId, {});
  const recurring = useRecurringQuery(jobId);
  const notFound = board.error instanceof ApiError && board.error.status === 404;

  return (
    <Screen testID="board-screen" maxWidth={wide ? 1200 : 720}>
      <BackLink href={links.job(jobId)} label={job.data?.name ?? 'The job'} testID="board-back" />
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Levels board
        </AppText>
        {board.data && view === 'table' ? (
          <AppText muted testID="board-today">
            Open, fix submitted and closed add up to the total on each level; voided findings are not counted. Overdue: open findings (new or
            returned) past their due date as of {formatDay(board.data.today)}. {Press} a number to see its findings.
          </AppText>
        ) : board.data ? (
          <AppText muted testID="board-today">
            The building floor by floor, roof on top: units checked, open findings by severity, fixes waiting for re-inspection, and whether
            the ceilings can close. {Press} a count to see its findings, a level to open it.
          </AppText>
        ) : null}
      </View>
      <BoardTabs jobId={jobId} role={job.data?.role} current="board" />
      {board.data?.companyScope ? (
        <Notice tone="info" testID="board-company-scope">
          These numbers, the trend and the recurring defects count only your company’s findings.
        </Notice>
      ) : null}
      {board.isPending ? (
        <LoadingState label="Loading the levels board…" />
      ) : board.isError ? (
        notFound ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={board.error.message} onRetry={() => board.refetch()} />
        )
      ) : board.data.levels.length === 0 ? (
        <EmptyState title="No levels yet" body="The board fills in once the job has levels and units, and an inspector walks them." testID="board-empty" />
      ) : (
        <>
          <Tabs
            items={[
              { key: 'building', label: 'As the building', href: links.board(jobId) },
              { key: 'table', label: 'As a table', href: links.board(jobId, 'table') },
            ]}
            current={view}
            testID="board-view"
          />
          {view === 'building' ? (
            <BuildingStack jobId={jobId} board={board.data} systems={systems.data?.systems} />
          ) : wide ? (
            <BoardGrid jobId={jobId} board={board.data} />
          ) : (
            <BoardCards jobId={jobId} board={board.data} />
          )}
        </>
      )}
      {notFound ? null : (
        <>
          <Card testID="board-trend">
            {trend.isPending ? (
              <LoadingState label="Loading the trend…" testID="trend-loading" />
            ) : trend.isError ? (
              <ErrorState message={trend.error.message} onRetry={() => trend.refetch()} testID="trend-error" />
            ) : (
              <TrendChart points={trend.data.points} />
            )}
          </Card>
          {recurring.isPending ? (
            <LoadingState label="Loading the recurring defects…" testID="recurring-loading" />
          ) : recurring.isError ? (
            <ErrorState message={recurring.error.message} onRetry={() => recurring.refetch()} testID="recurring-error" />
          ) : (
            <RecurringList jobId={jobId} data={recurring.data} wide={wide} />
          )}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.xs },
});
