import { Link } from 'expo-router';
import { useMemo, useRef, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { createFindingBatchSchema, type CreateFindingBatchInput, type FindingDetail } from '../../shared/schemas/findings';
import type { UnitDto } from '../../shared/schemas/setup';
import { unitKindLabel } from '../../shared/words';
import { ApiError } from '../api/client';
import type { Write } from '../api/mutations';
import { writeErrorMessage } from '../api/writeErrors';
import { links } from '../links';
import { isQueued } from '../outbox';
import { findingBatchWrite, useFindingBatchMutation } from '../queries/findings';
import { useUnitsQuery } from '../queries/units';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { ErrorState, LoadingState } from '../ui/States';
import { TextField } from '../ui/TextField';
import { PhotoPicker } from './PhotoPicker';
import type { PickedPhoto } from './PhotoPicker.types';

/** A level's units in one page (the API's largest); a level with more offers "Show more units". */
const UNITS_PAGE = 200;

type Outcome = { kind: 'logged'; items: FindingDetail[] } | { kind: 'kept'; count: number };

/**
 * "Also on other units": the defect just logged, logged again on units of the same level chosen
 * here, each with its own measured value and photo if it has one. One write (POST /findings/batch)
 * through the outbox, so it works with no signal and reaches the server once; all or nothing:
 * a refusal names the units it is about and nothing is logged.
 */
export function AlsoOnUnits({ jobId, finding, testID = 'also' }: { jobId: string; finding: FindingDetail; testID?: string }) {
  const [open, setOpen] = useState(false);
  if (!open) {
    return <Button label="Also on other units" tone="secondary" onPress={() => setOpen(true)} testID={`${testID}-open`} />;
  }
  return <Picker jobId={jobId} finding={finding} onClose={() => setOpen(false)} testID={testID} />;
}

function Picker({ jobId, finding, onClose, testID }: { jobId: string; finding: FindingDetail; onClose: () => void; testID: string }) {
  const units = useUnitsQuery(jobId, { levelId: finding.levelId }, UNITS_PAGE);
  const batch = useFindingBatchMutation(jobId);
  const [chosen, setChosen] = useState<string[]>([]);
  const [measured, setMeasured] = useState<Record<string, string>>({});
  const [photos, setPhotos] = useState<Map<string, PickedPhoto>>(new Map());
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [outcome, setOutcome] = useState<Outcome | null>(null);
  // One write per content: a retry of the same choice reuses its Idempotency-Key.
  const write = useRef<{ key: string; write: Write } | null>(null);
  const rule = finding.catalogue.rule;
  // Units this panel just logged the defect on: listed with their new finding, not offered twice.
  const [loggedOn, setLoggedOn] = useState<Record<string, string>>({});
  const others = useMemo(
    () => (units.data?.pages.flatMap((p) => p.items) ?? []).filter((u) => u.id !== finding.unitId),
    [units.data, finding.unitId],
  );
  const sameKind = others.filter((u) => u.kind === finding.unitKind && !loggedOn[u.id]);

  function toggle(unitId: string) {
    setOutcome(null);
    setChosen((c) => (c.includes(unitId) ? c.filter((x) => x !== unitId) : [...c, unitId]));
  }

  function input(): CreateFindingBatchInput {
    return {
      catalogueItemId: finding.catalogueItemId,
      levelId: finding.levelId,
      severity: finding.severity,
      companyId: finding.companyId,
      note: finding.note || undefined,
      walkId: finding.walkId,
      units: chosen.map((unitId) => ({ unitId, ...(rule && measured[unitId]?.trim() ? { measuredText: measured[unitId]!.trim() } : {}) })),
    };
  }

  /** A refusal's fields on the rows they name (`units.<i>.<field>` → that unit), the rest in the sentence. */
  function placeErrors(fields: Record<string, string>, sent: CreateFindingBatchInput) {
    const byUnit: Record<string, string> = {};
    for (const [key, text] of Object.entries(fields)) {
      const m = /^units\.(\d+)\./.exec(key);
      const unitId = m ? sent.units[Number(m[1])]?.unitId : undefined;
      if (unitId) byUnit[unitId] ??= text;
    }
    setErrors(byUnit);
  }

  function send() {
    setMessage(null);
    setErrors({});
    setOutcome(null);
    const body = input();
    const parsed = createFindingBatchSchema.safeParse(body);
    if (!parsed.success) {
      const fields: Record<string, string> = {};
      for (const issue of parsed.error.issues) fields[issue.path.join('.')] ??= issue.message;
      placeErrors(fields, body);
      setMessage(parsed.error.issues[0]?.message ?? 'Check the units chosen.');
      return;
    }
    const key = JSON.stringify([body, chosen.map((u) => photos.get(u)?.key ?? '')]);
    if (write.current?.key !== key) {
      write.current = { key, write: findingBatchWrite(jobId, body, photos, `${finding.code} on ${chosen.length} more unit${chosen.length === 1 ? '' : 's'}`) };
    }
    batch.mutate(write.current.write, {
      onSuccess: (answer) => {
        write.current = null;
        setOutcome(isQueued(answer) ? { kind: 'kept', count: body.units.length } : { kind: 'logged', items: answer.items });
        setLoggedOn((all) => ({
          ...all,
          ...Object.fromEntries(body.units.map((u, i) => [u.unitId, isQueued(answer) ? 'waiting to send' : `logged as ${answer.items[i]?.label ?? ''}`])),
        }));
        setChosen([]);
        setMeasured({});
        setPhotos(new Map());
      },
      onError: (err) => {
        // A refusal is final for this content; a changed choice makes a new write anyway.
        if (err instanceof ApiError) placeErrors(err.fields, body);
        setMessage(writeErrorMessage(err, { fieldsShown: err instanceof ApiError && Object.keys(err.fields).some((k) => k.startsWith('units.')) }));
      },
    });
  }

  return (
    <View style={styles.panel} testID={testID}>
      <View style={styles.top}>
        <AppText variant="title" role="heading">
          Also on other units
        </AppText>
        <Button label="Close" tone="quiet" onPress={onClose} testID={`${testID}-close`} />
      </View>
      <AppText muted testID={`${testID}-what`}>
        {[`${finding.code} ${finding.title}`, finding.severity, finding.companyName, finding.note ? `“${finding.note}”` : ''].filter(Boolean).join(' · ')}
      </AppText>
      <AppText>Choose the units of {finding.levelName} that have the same defect.
      </AppText>
      {outcome?.kind === 'logged' ? (
        <Notice tone="success" testID={`${testID}-done`}>
          <AppText>
            Logged on {outcome.items.length} more unit{outcome.items.length === 1 ? '' : 's'}:{' '}
          </AppText>
          {outcome.items.map((f) => (
            <Link key={f.id} href={links.finding(jobId, f.id)} testID={`${testID}-done-${f.unitTag}`}>
              <AppText style={{ color: colors.spruce, textDecorationLine: 'underline' }}>{`${f.label} ${f.unitTag}`}</AppText>
            </Link>
          ))}
        </Notice>
      ) : outcome?.kind === 'kept' ? (
        <Notice tone="info" testID={`${testID}-kept`}>
          Kept on this phone for {outcome.count} unit{outcome.count === 1 ? '' : 's'}: it is sent when there is signal.
        </Notice>
      ) : null}
      {units.isPending ? (
        <LoadingState label="Loading the level’s units…" />
      ) : units.isError ? (
        <ErrorState message={units.error.message} onRetry={() => void units.refetch()} />
      ) : others.length === 0 ? (
        <AppText muted testID={`${testID}-none`}>
          There are no other units on {finding.levelName}.
        </AppText>
      ) : (
        <>
          {sameKind.length > 1 && finding.unitKind ? (
            <Button
              label={chosen.length === sameKind.length ? 'Clear the choice' : `Choose every ${unitKindLabel(finding.unitKind).toLowerCase()} (${sameKind.length})`}
              tone="quiet"
              onPress={() => setChosen(chosen.length === sameKind.length ? [] : sameKind.map((u) => u.id))}
              testID={`${testID}-all-kind`}
            />
          ) : null}
          <View style={styles.list}>
            {others.map((u) => (
              <UnitRow
                key={u.id}
                unit={u}
                checked={chosen.includes(u.id)}
                done={loggedOn[u.id]}
                onToggle={() => toggle(u.id)}
                measuredLabel={rule ? `Measured on ${u.tag} (optional)` : null}
                measured={measured[u.id] ?? ''}
                onMeasured={(t) => setMeasured((m) => ({ ...m, [u.id]: t }))}
                photo={photos.get(u.id) ?? null}
                onPhoto={(p) =>
                  setPhotos((all) => {
                    const next = new Map(all);
                    if (p) next.set(u.id, p);
                    else next.delete(u.id);
                    return next;
                  })
                }
                error={errors[u.id]}
                testID={`${testID}-unit-${u.tag}`}
              />
            ))}
          </View>
          {units.hasNextPage ? <Button label="Show more units" tone="quiet" onPress={() => void units.fetchNextPage()} testID={`${testID}-more`} /> : null}
        </>
      )}
      {message ? (
        <Notice tone="error" title="Nothing was logged" testID={`${testID}-refused`}>
          {message}
        </Notice>
      ) : null}
      <Button
        label={chosen.length ? `Log on ${chosen.length} unit${chosen.length === 1 ? '' : 's'}` : 'Choose units above'}
        disabled={chosen.length === 0}
        busy={batch.isPending}
        onPress={send}
        testID={`${testID}-send`}
      />
    </View>
  );
}

function UnitRow({
  unit,
  checked,
  done,
  onToggle,
  measuredLabel,
  measured,
  onMeasured,
  photo,
  onPhoto,
  error,
  testID,
}: {
  unit: UnitDto;
  checked: boolean;
  /** Just logged here ("logged as #14"): shown, not chosen again. */
  done?: string;
  onToggle: () => void;
  measuredLabel: string | null;
  measured: string;
  onMeasured: (text: string) => void;
  photo: PickedPhoto | null;
  onPhoto: (photo: PickedPhoto | null) => void;
  error?: string;
  testID: string;
}) {
  const [photoProblem, setPhotoProblem] = useState<string | null>(null);
  return (
    <View style={[styles.row, checked && styles.rowOn, error ? styles.rowError : null]} testID={testID}>
      <Pressable
        role="checkbox"
        aria-checked={checked}
        aria-disabled={Boolean(done)}
        disabled={Boolean(done)}
        accessibilityLabel={`${unit.tag}, ${unitKindLabel(unit.kind)}${done ? `, ${done}` : ''}`}
        onPress={onToggle}
        style={styles.rowHead}
        testID={`${testID}-toggle`}
      >
        <View style={[styles.box, (checked || done) && styles.boxOn, done ? styles.boxDone : null]}>{checked || done ? <AppText style={styles.tick}>✓</AppText> : null}</View>
        <View style={styles.rowText}>
          <AppText variant="heading">{unit.tag}</AppText>
          <AppText variant="small" muted>
            {[unitKindLabel(unit.kind), unit.spaceName, done ? `Same defect ${done}` : ''].filter(Boolean).join(' · ')}
          </AppText>
        </View>
      </Pressable>
      {error ? (
        <AppText variant="small" style={{ color: colors.danger }} testID={`${testID}-error`}>
          {error}
        </AppText>
      ) : null}
      {checked ? (
        <View style={styles.extra}>
          {measuredLabel ? <TextField label={measuredLabel} value={measured} onChangeText={onMeasured} autoCapitalize="none" compact testID={`${testID}-measured`} /> : null}
          {photo ? (
            <View style={styles.photoLine}>
              <AppText variant="small" testID={`${testID}-photo-name`}>
                Photo: {photo.name}
              </AppText>
              <Button label="Remove photo" tone="quiet" onPress={() => onPhoto(null)} testID={`${testID}-photo-remove`} />
            </View>
          ) : (
            <PhotoPicker label={`Add a photo of ${unit.tag}`} onPick={(p) => onPhoto(p[0] ?? null)} onError={setPhotoProblem} testID={`${testID}-photo`} />
          )}
          {photoProblem ? <Notice tone="error">{photoProblem}</Notice> : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  panel: { backgroundColor: colors.surface, borderWidth: 1.5, borderColor: colors.spruce, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
  list: { gap: space.sm },
  row: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, backgroundColor: colors.surface, padding: space.sm, gap: space.sm },
  rowOn: { borderColor: colors.spruce, backgroundColor: colors.spruceSoft },
  rowError: { borderColor: colors.danger },
  rowHead: { flexDirection: 'row', alignItems: 'center', gap: space.md, minHeight: touchTarget },
  rowText: { flex: 1, gap: 2 },
  box: { width: 28, height: 28, borderRadius: 6, borderWidth: 2, borderColor: colors.spruce, alignItems: 'center', justifyContent: 'center', backgroundColor: colors.surface },
  boxOn: { backgroundColor: colors.spruce },
  boxDone: { opacity: 0.45 },
  tick: { color: '#FFFFFF', fontSize: 18, lineHeight: 22 },
  extra: { gap: space.sm, paddingLeft: 28 + space.md },
  photoLine: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm, flexWrap: 'wrap' },
});
