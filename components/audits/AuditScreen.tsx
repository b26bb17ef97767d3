import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { AUDIT_SCHEME_LABELS } from '../../shared/schemas/audits';
import { SEVERITY_LABELS, unitKindLabel } from '../../shared/words';
import { ApiError } from '../api/client';
import { exportUrls } from '../api/exports';
import { ExportLink } from '../exports/ExportLink';
import { formatWhen } from '../findings/due';
import { links } from '../links';
import { useAuditQuery } from '../queries/audits';
import { useJobQuery } from '../queries/jobs';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { auditTitle, DecisionBadge } from './parts';

/**
 * One audit: lot, plan and its source, seed, the sample with each unit's check and defects, the
 * results per class (Z1.4) or per tier, and the decision; when rejected, the follow-up: every unit
 * of the lot, level by level, each level's walk one tap away.
 */
export function AuditScreen({ jobId, auditId }: { jobId: string; auditId: string }) {
  const job = useJobQuery(jobId);
  const audit = useAuditQuery(jobId, auditId);
  const zone = job.data?.timeZone;
  const when = (iso: string) => (zone ? formatWhen(iso, zone) : iso);
  let body;
  if (audit.isError) {
    body =
      audit.error instanceof ApiError && (audit.error.status === 404 || audit.error.status === 403) ? (
        <EmptyState title="Audit not found" body="It is not on this job, or your role does not show audits." testID="audit-not-found" />
      ) : (
        <ErrorState message={audit.error.message} onRetry={() => void audit.refetch()} testID="audit-error" />
      );
  } else if (audit.isPending) {
    body = <LoadingState label="Loading the audit…" testID="audit-loading" />;
  } else {
    const a = audit.data;
    body = (
      <View style={styles.body} testID="audit-detail">
        <View style={styles.head}>
          <AppText variant="display" role="heading">
            {auditTitle(a)}
          </AppText>
          <DecisionBadge decision={a.decision} testID="audit-decision" />
          <AppText testID="audit-progress">
            {a.checked} of {a.sampleSize} sampled units checked{a.decidedAt ? ` · decided ${when(a.decidedAt)}` : ''}
          </AppText>
        </View>

        <View style={styles.card} testID="audit-plan">
          <AppText variant="heading" role="heading">
            Plan
          </AppText>
          <AppText>
            {AUDIT_SCHEME_LABELS[a.scheme]}
            {a.plan.kind === 'z14' ? `, general inspection level ${a.plan.level}, code letter ${a.plan.letter}` : ''}
          </AppText>
          <AppText testID="audit-lot">
            Lot of {a.lotSize}: {a.lotDescription}
          </AppText>
          {a.state.classes.map((c) => (
            <View key={c.severity} style={styles.line} testID={`audit-class-${c.severity}`}>
              <AppText variant="label">
                {SEVERITY_LABELS[c.severity]} {c.aql === null ? '(none allowed)' : `AQL ${c.aql}`}: sample {c.sampleSize}, accept {c.accept}, reject {c.reject}
              </AppText>
              <AppText testID={`audit-class-${c.severity}-result`}>
                {c.defects} defect{c.defects === 1 ? '' : 's'} in {c.checked} of {c.sampleSize} checked
              </AppText>
            </View>
          ))}
          {a.state.tiers.map((t) => (
            <View key={t.tier} style={styles.line} testID={`audit-tier-${t.tier}`}>
              <AppText variant="label">
                Tier {t.tier}: {t.size} units, fails at {t.failAt} failed
              </AppText>
              <AppText>
                {t.decision === 'not_needed' ? 'Not needed' : `${t.failed} failed in ${t.checked} of ${t.size} checked${t.decision === 'fail' ? ': failed' : t.decision === 'pass' ? ': passed' : ''}`}
              </AppText>
            </View>
          ))}
          <AppText variant="small" muted testID="audit-source">
            {a.plan.source}
          </AppText>
          <AppText variant="small" muted testID="audit-seed">
            Seed {a.seed} · planned by {a.plannedBy.name}, {when(a.startedAt)}
          </AppText>
          <AppText variant="small" muted>
            A sampled unit counts once a complete unit check is saved after the audit started; its defects are the findings logged on it since then.
          </AppText>
          <ExportLink href={exportUrls.auditCsv(jobId, a.id)} label="Audit report (CSV)" testID="audit-csv" />
        </View>

        {a.followUp ? (
          <View style={[styles.card, styles.followUp]} testID="audit-follow-up">
            <AppText variant="heading" role="heading">
              Follow-up: check every unit of the lot
            </AppText>
            <AppText>{a.followUp.remaining} units still to check. The walk screens mark them.</AppText>
            {a.followUp.levels.map((l) => (
              <Link key={l.levelId} href={links.levelWalk(jobId, l.levelId)} style={linkTarget} testID={`audit-follow-up-${l.levelId}`}>
                <AppText variant="label" style={{ color: colors.spruce }}>
                  {l.levelName}: {l.checkedSince} of {l.units} checked since the rejection →
                </AppText>
              </Link>
            ))}
          </View>
        ) : null}

        <View style={styles.card} testID="audit-sample">
          <AppText variant="heading" role="heading">
            Sample
          </AppText>
          {a.sample.map((s) => (
            <View key={s.unitId} style={[styles.unit, !s.active && styles.inactive]} testID={`audit-unit-${s.tag}`}>
              <Link href={links.unitCheck(jobId, s.unitId)} style={linkTarget}>
                <AppText variant="label" style={{ color: colors.spruce }}>
                  {s.position}. {s.tag}
                </AppText>
              </Link>
              <AppText variant="small" muted style={styles.grow}>
                {s.levelName} · {unitKindLabel(s.kind)}
                {a.scheme === 'tiered' ? ` · tier ${s.tier}${s.active ? '' : ' (if needed)'}` : ''}
              </AppText>
              <AppText variant="small" testID={`audit-unit-${s.tag}-state`}>
                {s.checkedAt ? 'Checked' : 'Not checked'}
                {s.defects.critical + s.defects.major + s.defects.minor > 0
                  ? ` · ${[s.defects.critical ? `${s.defects.critical} critical` : '', s.defects.major ? `${s.defects.major} major` : '', s.defects.minor ? `${s.defects.minor} minor` : ''].filter(Boolean).join(', ')}`
                  : ''}
              </AppText>
            </View>
          ))}
        </View>
      </View>
    );
  }
  return (
    <Screen testID="audit-screen" maxWidth={860}>
      <Link href={links.audits(jobId)} style={linkTarget} testID="audit-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Audits
        </AppText>
      </Link>
      {body}
    </Screen>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg, marginTop: space.md },
  head: { gap: space.sm },
  card: { backgroundColor: colors.surface, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line, padding: space.md, gap: space.sm },
  followUp: { borderColor: colors.danger },
  line: { gap: 2 },
  unit: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm, paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.line },
  inactive: { opacity: 0.6 },
  grow: { flexGrow: 1, flexBasis: 160 },
});
