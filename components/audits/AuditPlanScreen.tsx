import { zodResolver } from '@hookform/resolvers/zod';
import { Link, useRouter } from 'expo-router';
import { useEffect, useMemo, useRef } from 'react';
import { useForm, useWatch, type Path } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { codeLetter, INSPECTION_LEVELS, planTiered, planZ14, TIERED_SOURCE, Z14_SOURCE, type ClassRules } from '../../shared/calc/sampling';
import {
  AUDIT_SCHEME_LABELS,
  AUDIT_SCHEMES,
  CLASS_RULE_CHOICES,
  CLASS_RULE_LABELS,
  createAuditSchema,
  type AuditLotFilters,
  type CreateAuditInput,
} from '../../shared/schemas/audits';
import { SEVERITIES, SEVERITY_LABELS, UNIT_KINDS } from '../../shared/words';
import { ApiError } from '../api/client';
import type { Write } from '../api/mutations';
import { writeErrorMessage } from '../api/writeErrors';
import { links } from '../links';
import { isQueued } from '../outbox';
import { planAuditWrite, useLotUnitsQuery, usePlanAuditMutation } from '../queries/audits';
import { useCrewsQuery } from '../queries/crews';
import { useJobQuery } from '../queries/jobs';
import { useLevelsQuery } from '../queries/levels';
import { useModelsQuery } from '../queries/models';
import { useSystemsQuery } from '../queries/systems';
import { colors, linkTarget, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { FormChips, FormSegmented, FormSelect, FormText } from '../ui/FormFields';
import { FormBanner } from '../ui/FormBanner';
import { Screen } from '../ui/Screen';

type Values = CreateAuditInput;
const DEFAULTS: Values = {
  name: '',
  scheme: 'z14',
  inspectionLevel: 'II',
  classes: { critical: 'zero', major: '1.0', minor: '4.0' },
  lot: { levelIds: [], kinds: [], systemIds: [], crewIds: [], modelIds: [] },
};

/** Drops empty filters so the request names only what narrows the lot. */
function cleanLot(lot: AuditLotFilters | undefined): AuditLotFilters {
  const out: AuditLotFilters = {};
  for (const [k, v] of Object.entries(lot ?? {}) as [keyof AuditLotFilters, string[] | undefined][]) if (v && v.length) (out as Record<string, string[]>)[k] = v;
  return out;
}

/**
 * Plan an audit: the lot by filters (frozen by the server when planned), the scheme, and for Z1.4 the
 * inspection level and a rule per severity class. The preview counts the lot the filters choose now
 * and shows the plan Z1.4 Tables I and II-A give it (the server computes and keeps the real one).
 */
export function AuditPlanScreen({ jobId }: { jobId: string }) {
  const router = useRouter();
  const job = useJobQuery(jobId);
  const levels = useLevelsQuery(jobId);
  const systems = useSystemsQuery(jobId);
  const crews = useCrewsQuery(jobId);
  const models = useModelsQuery(jobId);
  const units = useLotUnitsQuery(jobId);
  const plan = usePlanAuditMutation(jobId);
  const { control, handleSubmit, setError, watch } = useForm<Values, unknown, CreateAuditInput>({
    resolver: zodResolver(createAuditSchema) as never,
    defaultValues: DEFAULTS,
  });
  const values = useWatch({ control }) as Values;
  const made = useRef<Write | null>(null);
  useEffect(() => {
    const sub = watch(() => {
      made.current = null;
    });
    return () => sub.unsubscribe();
  }, [watch]);

  const lot = cleanLot(values.lot as AuditLotFilters);
  const lotSize = useMemo(() => {
    if (!units.data) return null;
    return units.data.filter(
      (u) =>
        (!lot.levelIds || lot.levelIds.includes(u.levelId)) &&
        (!lot.kinds || lot.kinds.includes(u.kind)) &&
        (!lot.systemIds || (u.systemId !== null && lot.systemIds.includes(u.systemId))) &&
        (!lot.crewIds || (u.installedByCrew !== null && lot.crewIds.includes(u.installedByCrew.id))) &&
        (!lot.modelIds || (u.modelId !== null && lot.modelIds.includes(u.modelId))),
    ).length;
  }, [units.data, lot.levelIds, lot.kinds, lot.systemIds, lot.crewIds, lot.modelIds]);

  const chosen = { critical: values.classes?.critical, major: values.classes?.major, minor: values.classes?.minor };
  const { critical, major, minor } = chosen;
  const preview = useMemo(() => {
    const classes = { critical, major, minor };
    if (lotSize === null) return null;
    if (values.scheme === 'tiered') return lotSize >= 1 ? { kind: 'tiered' as const, plan: planTiered(lotSize) } : null;
    if (lotSize < 2) return null;
    const rules: ClassRules = {};
    for (const s of SEVERITIES) {
      const c = classes[s];
      if (!c || c === 'off') continue;
      rules[s] = c === 'zero' ? { aql: null } : { aql: c };
    }
    return { kind: 'z14' as const, plan: planZ14(lotSize, values.inspectionLevel ?? 'II', rules) };
  }, [lotSize, values.scheme, values.inspectionLevel, critical, major, minor]);

  const onSubmit = handleSubmit((input) => {
    if (plan.isPending) return;
    const write = made.current ?? planAuditWrite(jobId, { ...input, lot: cleanLot(input.lot) });
    made.current = write;
    plan.mutate(write, {
      onSuccess: (audit) => {
        made.current = null;
        router.replace(isQueued(audit) ? links.sync() : links.audit(jobId, audit.id));
      },
      onError: (err) => {
        const fields = err instanceof ApiError ? Object.entries(err.fields) : [];
        for (const [field, message] of fields) setError(field as Path<Values>, { message });
        setError('root', { message: writeErrorMessage(err, { fieldsShown: fields.length > 0 }) });
        if (err instanceof ApiError && err.status >= 400 && err.status < 500) made.current = null;
      },
    });
  });

  const chip = <T extends { id: string; name: string }>(rows: readonly T[] | undefined) => (rows ?? []).map((r) => ({ value: r.id, label: r.name }));
  const ruleOptions = CLASS_RULE_CHOICES.map((c) => ({ value: c, label: CLASS_RULE_LABELS[c] }));
  return (
    <Screen testID="audit-plan-screen" maxWidth={760}>
      <Link href={links.audits(jobId)} style={linkTarget} testID="audit-plan-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Audits{job.data ? ` · ${job.data.name}` : ''}
        </AppText>
      </Link>
      <AppText variant="display" role="heading" style={styles.title}>
        Plan an audit
      </AppText>
      <View style={styles.form}>
        <FormBanner control={control} testID="audit-plan-error" />
        <FormText control={control} name="name" label="Name" testID="audit-name" placeholder="Four-way cassettes, Levels 2 to 4" />
        <FormSegmented control={control} name="scheme" label="Plan" testID="audit-scheme" options={AUDIT_SCHEMES.map((s) => ({ value: s, label: AUDIT_SCHEME_LABELS[s] }))} />
        {values.scheme === 'z14' ? (
          <>
            <FormSegmented
              control={control}
              name="inspectionLevel"
              label="General inspection level"
              testID="audit-level"
              options={INSPECTION_LEVELS.map((l) => ({ value: l, label: l === 'II' ? 'II (usual)' : l }))}
            />
            <View style={styles.row}>
              {SEVERITIES.map((s) => (
                <View key={s} style={styles.cell}>
                  <FormSelect control={control} name={`classes.${s}` as Path<Values>} label={SEVERITY_LABELS[s]} testID={`audit-class-${s}`} options={ruleOptions} compact />
                </View>
              ))}
            </View>
          </>
        ) : (
          <AppText muted testID="audit-tiered-note">
            Commissioning practice, not a standard: 10 percent of the lot (at least 5 units); if 10 percent or more of them fail (a critical or major
            defect), another 10 percent; if that fails too, every unit.
          </AppText>
        )}
        <AppText variant="heading" role="heading">
          The lot
        </AppText>
        <AppText muted>Leave a filter empty to take every unit; the lot is frozen when the audit is planned.</AppText>
        <FormChips control={control} name={'lot.levelIds' as Path<Values>} label="Levels" testID="audit-lot-levels" options={chip(levels.data)} />
        <FormChips control={control} name={'lot.kinds' as Path<Values>} label="Unit kinds" testID="audit-lot-kinds" options={UNIT_KINDS.map((k) => ({ value: k.key, label: k.label }))} />
        {/* A job with no systems, crews or models yet offers no such filter. */}
        {systems.data?.length ? (
          <FormChips control={control} name={'lot.systemIds' as Path<Values>} label="Systems" testID="audit-lot-systems" options={chip(systems.data)} />
        ) : null}
        {crews.data?.items.length ? (
          <FormChips
            control={control}
            name={'lot.crewIds' as Path<Values>}
            label="Crews"
            testID="audit-lot-crews"
            options={crews.data.items.map((c) => ({ value: c.id, label: `${c.companyName} · ${c.name}` }))}
          />
        ) : null}
        {models.data?.length ? (
          <FormChips control={control} name={'lot.modelIds' as Path<Values>} label="Models" testID="audit-lot-models" options={chip(models.data)} />
        ) : null}

        <View style={styles.preview} testID="audit-preview" aria-live="polite">
          <AppText variant="heading">
            {lotSize === null ? 'Counting the lot…' : `Lot of ${lotSize} unit${lotSize === 1 ? '' : 's'}`}
          </AppText>
          {preview?.kind === 'z14' ? (
            <>
              <AppText testID="audit-preview-letter">
                Code letter {preview.plan.letter} (level {values.inspectionLevel}); sample of {preview.plan.sampleSize}
              </AppText>
              {preview.plan.classes.map((c) => (
                <AppText key={c.severity} testID={`audit-preview-${c.severity}`}>
                  {SEVERITY_LABELS[c.severity]} {c.aql === null ? '(none allowed)' : `AQL ${c.aql}`}: {c.sampleSize} units, accept {c.accept}, reject {c.reject}
                  {c.planLetter && c.planLetter !== preview.plan.letter ? ` (arrow to ${c.planLetter})` : ''}
                  {c.everyUnit ? ' (every unit)' : ''}
                </AppText>
              ))}
              <AppText variant="small" muted>
                {Z14_SOURCE}
              </AppText>
            </>
          ) : preview?.kind === 'tiered' ? (
            <>
              <AppText testID="audit-preview-tiers">
                First tier {preview.plan.tierSizes[0]} units (fails at {preview.plan.failAt[0]}); second tier {preview.plan.tierSizes[1]}
              </AppText>
              <AppText variant="small" muted>
                {TIERED_SOURCE}
              </AppText>
            </>
          ) : lotSize !== null ? (
            <AppText muted>{values.scheme === 'z14' && lotSize < 2 ? `Z1.4 starts at 2 units (Table I, lot ${lotSize >= 0 ? lotSize : 0}).` : 'Choose a lot.'}</AppText>
          ) : null}
          {preview?.kind === 'z14' && lotSize !== null && lotSize >= 2 ? (
            <AppText variant="small" muted>
              Table I: lot {lotSize} at level {values.inspectionLevel} is letter {codeLetter(lotSize, values.inspectionLevel ?? 'II')}.
            </AppText>
          ) : null}
        </View>
        <Button label="Plan the audit and draw the sample" testID="audit-plan-submit" busy={plan.isPending} onPress={() => void onSubmit()} />
      </View>
    </Screen>
  );
}

const styles = StyleSheet.create({
  title: { marginVertical: space.md },
  form: { gap: space.lg },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  cell: { flexGrow: 1, flexBasis: 180 },
  preview: { backgroundColor: colors.spruceSoft, borderRadius: radius.md, padding: space.md, gap: space.xs },
});
