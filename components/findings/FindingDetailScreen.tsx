import { Link } from 'expo-router';
import { useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import type { UnitSystem } from '../../shared/catalogue/types';
import { dueAgainWords } from '../../shared/rules/dueAgain';
import { defectCodeWords, OTHER_DEFECT_CODE } from '../../shared/rules/somethingElse';
import type { FindingDetail } from '../../shared/schemas/findings';
import type { Role } from '../../shared/words';
import { ApiError } from '../api/client';
import { BeforeAfter, latestFixPhotos } from '../correction/BeforeAfter';
import { Comments } from '../correction/Comments';
import { FindingActions } from '../correction/FindingActions';
import { AddPhotosForm } from '../correction/AddPhotosForm';
import { FixAndReinspection } from '../correction/FixAndReinspection';
import { FixForm } from '../correction/FixForm';
import { mayAddPhotos, mayDo, mayPin } from '../correction/rules';
import { Timeline } from '../correction/Timeline';
import { useFindingQuery } from '../queries/findings';
import { useJobQuery } from '../queries/jobs';
import { useSessionQuery } from '../queries/session';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { ItemCaution } from '../walk/ItemCaution';
import { SeverityMark } from '../walk/SeverityMark';
import { formatDay, formatWhen } from './due';
import { AlsoOnUnits } from './AlsoOnUnits';
import { StatusBadge } from './FindingCard';
import { FixWaiting } from './FixWaiting';
import { PhotoStrip } from './PhotoStrip';
import { MarkupEditor, type MarkupPhoto } from '../photos/MarkupEditor';
import { PlanPinLink } from '../plans/PlanPinLink';
import { links } from '../links';

export function FindingDetailScreen({ jobId, findingId }: { jobId: string; findingId: string }) {
  const job = useJobQuery(jobId);
  const finding = useFindingQuery(jobId, findingId);
  const session = useSessionQuery();
  const sub = job.data?.role === 'subcontractor';
  const failed = job.isError ? job.error : finding.isError ? finding.error : null;
  return (
    <Screen testID="finding-detail-screen" maxWidth={720}>
      <Link href={sub ? links.inbox() : links.findings(jobId)} style={styles.back} testID="finding-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          {sub ? '← Your findings to fix' : '← All findings'}
        </AppText>
      </Link>
      {failed ? (
        failed instanceof ApiError && failed.status === 404 ? (
          <EmptyState title="Finding not found" body="It does not exist on this job, or it is not assigned to your company." testID="finding-not-found" />
        ) : (
          <ErrorState message={failed.message} onRetry={() => void Promise.all([job.refetch(), finding.refetch()])} />
        )
      ) : !job.data || !finding.data ? (
        <LoadingState label="Loading the finding…" />
      ) : (
        <FindingBody
          jobId={jobId}
          f={finding.data}
          timeZone={job.data.timeZone}
          system={job.data.unitSystem}
          role={job.data.role}
          isLogger={finding.data.loggedBy.id === session.data?.user?.id}
          reload={() => void finding.refetch()}
        />
      )}
    </Screen>
  );
}

function Row({ label, children, testID }: { label: string; children: ReactNode; testID?: string }) {
  return (
    <View style={styles.row} testID={testID}>
      <AppText variant="label" muted style={styles.rowLabel}>
        {label}
      </AppText>
      <View style={styles.rowValue}>{typeof children === 'string' ? <AppText>{children}</AppText> : children}</View>
    </View>
  );
}

function FindingBody({
  jobId,
  f,
  timeZone,
  system,
  role,
  isLogger,
  reload,
}: {
  jobId: string;
  f: FindingDetail;
  timeZone: string;
  system: UnitSystem;
  role: Role;
  isLogger: boolean;
  /** Someone changed the finding first: fetch it as it is now. */
  reload: () => void;
}) {
  const r = f.ruleResult;
  const q = f.catalogue.quantity;
  const fmt = (v: number | null) => (v === null || !q || q === 'boolean' ? null : formatQuantity(v, q, system));
  // The defect's photos (as logged and added since); the fix's and the re-inspection's have their own places.
  const logPhotos = f.photos.filter((p) => p.stage === 'finding');
  const fixPhotos = f.photos.filter((p) => p.fixId);
  const latestFix = latestFixPhotos(f.photos);
  const lastReturn = [...f.events].reverse().find((e) => e.kind === 'returned');
  const dueAgain = lastReturn && f.status === 'open' ? dueAgainWords(lastReturn.to, f.severity, formatDay) : null;
  const sub = role === 'subcontractor';
  // Marks are drawn by those who add photos (the server holds the rule); a saved change gives the
  // photo a new address so the page shows the flattened copy at once.
  const [marking, setMarking] = useState<MarkupPhoto | null>(null);
  const [markedAt, setMarkedAt] = useState<Record<string, number>>({});
  const shown = (url: string, id: string) => (markedAt[id] ? `${url}?m=${markedAt[id]}` : url);
  const markUp = mayAddPhotos(f.status, role)
    ? (id: string) => {
        const i = logPhotos.findIndex((p) => p.id === id);
        const p = logPhotos[i];
        if (p) setMarking({ id: p.id, originalUri: `${p.url}?original=1`, width: p.width ?? 4, height: p.height ?? 3, label: `photo ${i + 1} of ${f.label}` });
      }
    : undefined;
  return (
    <>
      {marking ? (
        <MarkupEditor
          photo={marking}
          onClose={(saved) => {
            if (saved) setMarkedAt((m) => ({ ...m, [marking.id]: Date.now() }));
            setMarking(null);
          }}
        />
      ) : null}
      <View style={styles.head}>
        <AppText variant="label" muted testID="finding-label">
          {f.label} · {defectCodeWords(f.code)}
        </AppText>
        <AppText variant="display" role="heading" testID="finding-title">
          {f.title}
        </AppText>
        <View style={styles.badges}>
          <StatusBadge status={f.status} testID="finding-status" />
          <SeverityMark severity={f.severity} testID="finding-severity" />
          {f.overdue ? <AppText style={styles.overdue}>⚠ Overdue</AppText> : null}
          <FixWaiting finding={f} timeZone={timeZone} testID="finding-waiting" />
        </View>
      </View>

      {f.status === 'open' && lastReturn?.reason ? (
        <Notice tone="error" title={`Returned ${f.returnCount === 1 ? 'once' : `${f.returnCount} times`}`} testID="finding-returned">
          {`Returned: ${lastReturn.reason}${dueAgain ? `\n${dueAgain}.` : ''}`}
        </Notice>
      ) : null}

      <Card>
        <Row label="Where" testID="finding-where">
          <View>
            {f.unitId && f.unitTag ? (
              <Link href={links.unitCheck(jobId, f.unitId)}>
                <AppText style={styles.link}>Unit {f.unitTag}</AppText>
              </Link>
            ) : null}
            <AppText>{[f.spaceName, f.levelName].filter(Boolean).join(' · ')}</AppText>
            <PlanPinLink jobId={jobId} levelId={f.levelId} kind="finding" id={f.id} pinned={f.pinX !== null} canPlace={mayPin(f.status, role)} testID="finding-plan-link" />
          </View>
        </Row>
        <Row label="Company" testID="finding-company">
          {f.companyName}
        </Row>
        <Row label="Due" testID="finding-due">
          {formatDay(f.dueOn)}
        </Row>
        <Row label="Logged">{`${formatWhen(f.loggedAt, timeZone)} by ${f.loggedBy.name}`}</Row>
        {f.returnCount ? <Row label="Returned">{`${f.returnCount} time${f.returnCount === 1 ? '' : 's'}`}</Row> : null}
        {f.voidedReason ? <Row label="Voided because">{f.voidedReason}</Row> : null}
      </Card>

      {f.measuredText ? (
        <View style={[styles.measured, r?.pass === false ? styles.fail : r?.pass ? styles.pass : styles.unset]} testID="finding-measured">
          <AppText variant="label">{f.catalogue.measure ?? 'Measured'}</AppText>
          <View style={styles.badges}>
            {r?.pass === true || r?.pass === false ? (
              <View style={[styles.stamp, { backgroundColor: r.pass ? colors.good : colors.danger }]}>
                <AppText variant="label" style={{ color: '#FFFFFF' }} testID="finding-measured-status">
                  {r.pass ? '✓ PASS' : '✗ FAIL'}
                </AppText>
              </View>
            ) : null}
            <AppText variant="heading">{f.measuredText}</AppText>
          </View>
          {r && fmt(r.limit) ? (
            <AppText variant="small" testID="finding-measured-limit">
              Limit: {r.upper !== null ? `${fmt(r.limit)} to ${fmt(r.upper)}` : fmt(r.limit)}
              {r.tolerance !== null ? ` ± ${fmt(r.tolerance)}` : ''}
            </AppText>
          ) : null}
          {r && r.margin !== null && fmt(Math.abs(r.margin)) ? (
            <AppText variant="small">Margin: {r.margin >= 0 ? `${fmt(r.margin)} to spare` : `${fmt(-r.margin)} outside the limit`}</AppText>
          ) : null}
          {r?.limitSource ? (
            <AppText variant="small" muted testID="finding-measured-source">
              Source: {r.limitSource}
            </AppText>
          ) : null}
          {r ? <AppText variant="small">{r.message}</AppText> : null}
        </View>
      ) : null}

      {f.note ? (
        <Card>
          <AppText variant="label">Note</AppText>
          <AppText testID="finding-note">{f.note}</AppText>
        </Card>
      ) : null}

      <View style={styles.section}>
        <AppText variant="title" role="heading">
          Photos ({logPhotos.length})
        </AppText>
        {fixPhotos.length ? (
          <BeforeAfter before={logPhotos} after={latestFix} label={f.label} testID="finding-before-after" />
        ) : logPhotos.length ? (
          <PhotoStrip
            testID="finding-photos"
            photos={logPhotos.map((p, i) => ({ key: p.id, thumbUri: shown(p.thumbUrl, p.id), fullUri: shown(p.url, p.id), label: `Photo ${i + 1} of ${f.label}` }))}
            onMarkUp={markUp}
          />
        ) : (
          <AppText muted>No photos with this finding.</AppText>
        )}
      </View>

      <FixAndReinspection photos={f.photos} events={f.events} label={f.label} timeZone={timeZone} testID="finding-fix-and-reinspection" />

      {mayAddPhotos(f.status, role) ? <AddPhotosForm jobId={jobId} finding={f} onStale={reload} testID="finding-add-photos" /> : null}

      {/* The same defect on the next units of the corridor, without filling the form again. */}
      {!sub && f.status === 'open' && f.unitId && f.code !== OTHER_DEFECT_CODE ? <AlsoOnUnits jobId={jobId} finding={f} testID="finding-also" /> : null}

      {/* Inspector and GC: the verdict and the changes right under the photos they compare. */}
      {!sub ? <FindingActions jobId={jobId} finding={f} role={role} isLogger={isLogger} system={system} timeZone={timeZone} onStale={reload} /> : null}

      <Card>
        <AppText variant="label">About this defect type</AppText>
        <AppText variant="small">{f.catalogue.description}</AppText>
        <AppText variant="label">How it is usually fixed</AppText>
        <AppText variant="small">{f.catalogue.fixGuidance}</AppText>
        {f.catalogue.needsCeilingAccess ? <AppText variant="small" muted>The fix needs access above the ceiling.</AppText> : null}
        {f.catalogue.caution ? null : (
          <AppText variant="small" muted testID="finding-guidance-deferral">
            This guidance is general: the manufacturer’s installation manual, local codes and licensed practice govern.
          </AppText>
        )}
      </Card>
      {f.catalogue.caution ? <ItemCaution text={f.catalogue.caution} initiallyOpen testID="finding-caution" /> : null}

      {sub && mayDo('submit_fix', f.status, role, isLogger) ? (
        <FixForm jobId={jobId} finding={f} system={system} onStale={reload} />
      ) : sub && f.status === 'fix_submitted' ? (
        <Notice tone="info" title="Fix sent" testID="finding-fix-waiting">
          The inspector re-inspects it next. You will see here whether it is accepted or returned.
        </Notice>
      ) : null}

      <Timeline events={f.events} photos={f.photos} timeZone={timeZone} />
      <Comments jobId={jobId} findingId={f.id} timeZone={timeZone} />
    </>
  );
}

const styles = StyleSheet.create({
  back: linkTarget,
  head: { gap: space.xs },
  badges: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  overdue: { color: colors.danger, fontWeight: '700' },
  row: { flexDirection: 'row', gap: space.md, paddingVertical: 2, flexWrap: 'wrap' },
  rowLabel: { width: 96 },
  rowValue: { flex: 1, minWidth: 160 },
  link: { color: colors.spruce, textDecorationLine: 'underline', fontWeight: '700' },
  measured: { borderRadius: radius.md, borderLeftWidth: 4, padding: space.md, gap: 4 },
  pass: { backgroundColor: colors.goodSoft, borderLeftColor: colors.good },
  fail: { backgroundColor: colors.dangerSoft, borderLeftColor: colors.danger },
  unset: { backgroundColor: colors.ochreSoft, borderLeftColor: colors.ochre },
  stamp: { borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 2 },
  section: { gap: space.sm },
});
