import { Link } from 'expo-router';
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import {
  IMPORT_MAX_BYTES,
  IMPORT_MAX_ROWS,
  UNIT_IMPORT_FIELDS,
  UNIT_IMPORT_KIND_SOURCES,
  UNIT_IMPORT_REQUIRED,
  type JobDetail,
  type UnitImportField,
  type UnitImportReport,
} from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { importWrite, undoImportWrite, useImportUnitsMutation, useUndoImportMutation, useUnitImportsQuery } from '../queries/units';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FilePicker } from '../ui/FilePicker';
import { Notice } from '../ui/Notice';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';
import { writeErrorMessage } from '../api/writeErrors';
import { guessMapping, ignoredButNamed, readHeader } from './csvHeader';
import { KindValues, MissingPlaces, RevisionView } from './ImportChoices';
import { ImportReportView } from './ImportReportView';
import { links } from '../links';
import { SetupFrame, canEditSetup } from './SetupFrame';

const FIELD_LABEL: Record<UnitImportField, string> = {
  tag: 'Tag',
  kind: 'Unit kind',
  model: 'Model',
  capacity: 'Capacity',
  level: 'Level',
  space: 'Space',
  system: 'System',
  crew: 'Crew that installed it',
  crewCompany: "Crew's company",
  mount: 'Mounting (floor, wall, ceiling)',
};

export function ImportUnitsScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame
      jobId={jobId}
      section="import"
      title="Import units"
      intro="Bring in the equipment schedule as a CSV file, or a revised one: map its columns and kinds, preview what changes, then import. Either every row is imported or none, and an import can be undone."
      testID="import-screen"
    >
      {(job) =>
        canEditSetup(job) ? (
          <ImportBody job={job} />
        ) : (
          <Notice tone="info" testID="import-read-only">
            Only a GC manager of this job imports units.
          </Notice>
        )
      }
    </SetupFrame>
  );
}

function ImportBody({ job }: { job: JobDetail }) {
  const [csv, setCsv] = useState('');
  const [fileName, setFileName] = useState<string | null>(null);
  const [mapping, setMapping] = useState<Record<string, UnitImportField>>({});
  const [kindValues, setKindValues] = useState<Record<string, UnitKindKey>>({});
  const [createPlaces, setCreatePlaces] = useState(false);
  const [removeMissing, setRemoveMissing] = useState(false);
  const [report, setReport] = useState<UnitImportReport | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const run = useImportUnitsMutation(job.id);
  const headers = useMemo(() => readHeader(csv), [csv]);

  const load = (text: string, name: string | null) => {
    setCsv(text);
    setFileName(name);
    setMapping(guessMapping(readHeader(text)));
    setKindValues({});
    setCreatePlaces(false);
    setRemoveMissing(false);
    setReport(null);
    setProblem(null);
  };

  const mapped = new Set(Object.values(mapping));
  const missing = UNIT_IMPORT_REQUIRED.filter((f) => !mapped.has(f));
  const noKind = !UNIT_IMPORT_KIND_SOURCES.some((f) => mapped.has(f));
  const ignored = ignoredButNamed(headers, mapping);
  const tooBig = csv.length > IMPORT_MAX_BYTES;

  const send = (dryRun: boolean, choices?: { kindValues?: Record<string, UnitKindKey>; createPlaces?: boolean; removeMissing?: boolean }) => {
    setProblem(null);
    const input = {
      csv,
      mapping,
      dryRun,
      kindValues: choices?.kindValues ?? kindValues,
      createPlaces: choices?.createPlaces ?? createPlaces,
      removeMissing: choices?.removeMissing ?? removeMissing,
      ...(fileName ? { fileName: fileName.slice(0, 200) } : {}),
    };
    run.mutate(importWrite(job.id, input), {
      onSuccess: (r) => setReport(r),
      onError: (err) => {
        setReport(null);
        setProblem(writeErrorMessage(err));
      },
    });
  };

  // A choice made in the preview is previewed again at once, so the counts on screen are the ones Import applies.
  const chooseKind = (value: string, kind: UnitKindKey | null) => {
    const next = { ...kindValues };
    if (kind) next[value] = kind;
    else delete next[value];
    setKindValues(next);
    send(true, { kindValues: next });
  };
  const tickPlaces = (on: boolean) => {
    setCreatePlaces(on);
    send(true, { createPlaces: on });
  };
  const tickRemove = (on: boolean) => {
    setRemoveMissing(on);
    send(true, { removeMissing: on });
  };

  const done = report?.committed === true;
  const nothingToDo = report !== null && report.revision.added === 0 && report.revision.changed.length === 0 && !(removeMissing && report.revision.notInFile.some((n) => n.removable));
  const canCommit = report !== null && !report.committed && report.badRows === 0 && report.goodRows > 0 && !nothingToDo;
  const commitLabel = report ? importLabel(report, removeMissing) : '';

  return (
    <View style={styles.body}>
      <Card testID="import-source">
        <AppText variant="heading">1. The file</AppText>
        <AppText variant="small" muted>
          One row per unit with a header row. Tag and level are needed, and a unit kind or a model (a unit takes its model&apos;s kind); capacity,
          space, system and the rest are optional. Kinds are read the way schedules write them (&quot;4-WAY CASSETTE&quot;, &quot;Wall mount&quot;,
          &quot;Ducted HSP&quot;). Levels and spaces the job lacks can be created with the import. A unit whose tag is already in the job is
          changed, not added. At most {IMPORT_MAX_ROWS.toLocaleString()} rows.
        </AppText>
        <View style={styles.row}>
          <FilePicker label="Choose a CSV file" accept=".csv,text/csv" testID="import-file" onText={(t, n) => load(t, n)} onError={setProblem} />
          {fileName ? (
            <AppText variant="small" testID="import-file-name">
              {fileName}
            </AppText>
          ) : null}
        </View>
        <TextField
          label="…or paste the CSV here"
          testID="import-csv"
          multiline
          value={csv}
          onChangeText={(t) => load(t, null)}
          placeholder={'Tag,Unit kind,Capacity (Btu/h),Level,Space,System\nIU-1-01,Ceiling cassette four-way,24000,Level 1,Lobby,VRF-1'}
          style={styles.paste}
          autoCapitalize="none"
          autoCorrect={false}
          error={tooBig ? 'The CSV is larger than 2 MB: split it into smaller files.' : undefined}
        />
      </Card>

      {headers.length > 0 ? (
        <Card testID="import-mapping">
          <AppText variant="heading">2. Match the columns</AppText>
          <AppText variant="small" muted>
            We guessed from the headers. Change any that are wrong; leave a column on &quot;Ignore&quot; to skip it.
          </AppText>
          <View style={styles.mapping}>
            {headers.map((h, i) => (
              <View key={`${h}-${i}`} style={styles.mapItem}>
                <Select
                  compact
                  label={h || `Column ${i + 1}`}
                  testID={`import-map-${i}`}
                  value={mapping[h] ?? ''}
                  placeholder="Ignore"
                  options={UNIT_IMPORT_FIELDS.map((f) => ({ value: f, label: FIELD_LABEL[f] }))}
                  onChange={(v) => {
                    setReport(null);
                    setMapping((m) => {
                      const next = { ...m };
                      // one column per field
                      for (const [k, f] of Object.entries(next)) if (f === v) delete next[k];
                      if (v) next[h] = v as UnitImportField;
                      else delete next[h];
                      return next;
                    });
                  }}
                />
              </View>
            ))}
          </View>
          {ignored.length > 0 ? (
            <Notice tone="caution" testID="import-ignored">
              {ignored.map((x) => `"${x.header}" looks like ${FIELD_LABEL[x.field].toLowerCase()} but is ignored.`).join(' ')}
            </Notice>
          ) : null}
          {missing.length > 0 || noKind ? (
            <Notice tone="caution" testID="import-missing">
              {`Match a column to ${[...missing.map((f) => FIELD_LABEL[f].toLowerCase()), ...(noKind ? ['unit kind or model'] : [])].join(', ')}: every unit needs one.`}
            </Notice>
          ) : null}
          <View style={styles.row}>
            <Button
              testID="import-preview-button"
              label="Preview"
              tone={canCommit ? 'secondary' : 'primary'}
              disabled={missing.length > 0 || noKind || tooBig}
              busy={run.isPending && !canCommit}
              onPress={() => send(true)}
            />
          </View>
        </Card>
      ) : null}

      {problem ? (
        <Notice tone="error" title="The file could not be read" testID="import-problem">
          {problem}
        </Notice>
      ) : null}

      {report ? (
        <Card testID="import-result">
          <AppText variant="heading">{done ? 'Done' : '3. Preview'}</AppText>
          {!done ? <KindValues values={report.kindValues} chosen={kindValues} onChoose={chooseKind} /> : null}
          <MissingPlaces report={report} create={createPlaces} onCreate={tickPlaces} />
          <RevisionView report={report} unitSystem={job.unitSystem} removeMissing={removeMissing} onRemoveMissing={tickRemove} />
          <ImportReportView report={report} unitSystem={job.unitSystem} />
          {canCommit ? (
            <Button testID="import-commit" label={commitLabel} busy={run.isPending} onPress={() => send(false)} style={styles.commit} />
          ) : null}
          {done ? (
            <Link href={links.setup(job.id, 'units')} style={styles.link} testID="import-see-units">
              <AppText variant="label" style={{ color: colors.spruce }}>
                See the units register →
              </AppText>
            </Link>
          ) : null}
        </Card>
      ) : null}

      <ImportHistory jobId={job.id} />
    </View>
  );
}

const placeCount = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/** "Import 3 units" / "Import: add 1 unit, change 2" */
function importLabel(report: UnitImportReport, removeMissing: boolean): string {
  const r = report.revision;
  const removing = removeMissing ? r.notInFile.filter((n) => n.removable).length : 0;
  if (r.changed.length === 0 && removing === 0) return `Import ${r.added} unit${r.added === 1 ? '' : 's'}`;
  const parts = [
    r.added > 0 ? `add ${r.added}` : null,
    r.changed.length > 0 ? `change ${r.changed.length}` : null,
    removing > 0 ? `delete ${removing}` : null,
  ].filter(Boolean);
  return `Import: ${parts.join(', ')} unit${r.added + r.changed.length + removing === 1 ? '' : 's'}`;
}

/** The job's recent imports; the latest can be undone while none of its units has a check or a finding. */
function ImportHistory({ jobId }: { jobId: string }) {
  const imports = useUnitImportsQuery(jobId);
  const undo = useUndoImportMutation(jobId);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const items = imports.data?.items ?? [];
  if (imports.isPending || imports.isError || items.length === 0) return null;
  return (
    <Card testID="import-history">
      <AppText variant="heading">Recent imports</AppText>
      {message ? (
        <Notice tone={message.tone} testID="import-undo-result">
          {message.text}
        </Notice>
      ) : null}
      <View role="list" style={styles.history}>
        {items.slice(0, 5).map((i, index) => (
          <View key={i.id} role="listitem" style={styles.historyRow} testID={`import-history-${index}`}>
            <View style={styles.historyText}>
              <AppText variant="label">
                {`${new Date(i.createdAt).toLocaleString()}${i.fileName ? ` · ${i.fileName}` : ''}`}
              </AppText>
              <AppText variant="small" muted>
                {[
                  `${i.added} added`,
                  `${i.changed} changed`,
                  i.removed > 0 ? `${i.removed} deleted` : null,
                  i.levelsCreated + i.spacesCreated > 0 ? `${placeCount(i.levelsCreated, 'level')} and ${placeCount(i.spacesCreated, 'space')} created` : null,
                  i.createdByName ? `by ${i.createdByName}` : null,
                  i.undoneAt ? 'undone' : null,
                ]
                  .filter(Boolean)
                  .join(' · ')}
              </AppText>
              {!i.undoneAt && !i.undo.possible && index === 0 ? (
                <AppText variant="small" testID="import-undo-reason">
                  {i.undo.reason}
                </AppText>
              ) : null}
            </View>
            {i.undo.possible ? (
              <Button
                testID={`import-undo-${index}`}
                tone="secondary"
                label="Undo this import"
                busy={undo.isPending}
                onPress={() => {
                  setMessage(null);
                  undo.mutate(undoImportWrite(jobId, i.id), {
                    onSuccess: (r) =>
                      setMessage({ tone: 'success', text: `Import undone: ${r.deleted} unit${r.deleted === 1 ? '' : 's'} removed, ${r.restored} put back as they were.` }),
                    onError: (err) => setMessage({ tone: 'error', text: writeErrorMessage(err) }),
                  });
                }}
              />
            ) : null}
          </View>
        ))}
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'center' },
  paste: { minHeight: 160, paddingTop: space.sm, textAlignVertical: 'top', fontSize: 15 },
  mapping: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  mapItem: { flexGrow: 1, flexBasis: 180, minWidth: 0 },
  commit: { alignSelf: 'flex-start' },
  link: { alignSelf: 'flex-start', paddingVertical: space.xs },
  history: { gap: space.sm },
  historyRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'center', paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.line },
  historyText: { flexGrow: 1, flexBasis: 240, minWidth: 0, gap: 2 },
});
