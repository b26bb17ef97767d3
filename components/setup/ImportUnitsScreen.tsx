import { Link } from 'expo-router';
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { IMPORT_MAX_BYTES, IMPORT_MAX_ROWS, UNIT_IMPORT_FIELDS, UNIT_IMPORT_REQUIRED, type JobDetail, type UnitImportField, type UnitImportReport } from '../../shared/schemas/setup';
import { importWrite, useImportUnitsMutation } from '../queries/units';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FilePicker } from '../ui/FilePicker';
import { Notice } from '../ui/Notice';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';
import { writeErrorMessage } from '../api/writeErrors';
import { guessMapping, readHeader } from './csvHeader';
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
      intro="Bring in the equipment schedule as a CSV file: map its columns, preview, fix any bad rows, then import. Either every row is imported or none."
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
  const [report, setReport] = useState<UnitImportReport | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const run = useImportUnitsMutation(job.id);
  const headers = useMemo(() => readHeader(csv), [csv]);

  const load = (text: string, name: string | null) => {
    setCsv(text);
    setFileName(name);
    setMapping(guessMapping(readHeader(text)));
    setReport(null);
    setProblem(null);
  };

  const mapped = new Set(Object.values(mapping));
  const missing = UNIT_IMPORT_REQUIRED.filter((f) => !mapped.has(f));
  const tooBig = csv.length > IMPORT_MAX_BYTES;

  const send = (dryRun: boolean) => {
    setProblem(null);
    run.mutate(importWrite(job.id, { csv, mapping, dryRun }), {
      onSuccess: (r) => setReport(r),
      onError: (err) => {
        setReport(null);
        setProblem(writeErrorMessage(err));
      },
    });
  };

  const done = report?.committed === true;
  const canCommit = report !== null && !report.committed && report.badRows === 0 && report.goodRows > 0;

  return (
    <View style={styles.body}>
      <Card testID="import-source">
        <AppText variant="heading">1. The file</AppText>
        <AppText variant="small" muted>
          One row per unit with a header row. Columns: tag, unit kind and level are needed; model, capacity, space and system are
          optional. Levels, spaces, systems and models are matched by name, so add them first. At most {IMPORT_MAX_ROWS.toLocaleString()} rows.
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
          placeholder={'Tag,Unit kind,Level,Space,System\nIU-1-01,Ceiling cassette four-way,Level 1,Lobby,VRF-1'}
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
          {missing.length > 0 ? (
            <Notice tone="caution" testID="import-missing">
              {`Match a column to ${missing.map((f) => FIELD_LABEL[f].toLowerCase()).join(', ')}: every unit needs one.`}
            </Notice>
          ) : null}
          <View style={styles.row}>
            <Button
              testID="import-preview-button"
              label="Preview"
              tone={canCommit ? 'secondary' : 'primary'}
              disabled={missing.length > 0 || tooBig}
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
          <ImportReportView report={report} unitSystem={job.unitSystem} />
          {canCommit ? (
            <Button
              testID="import-commit"
              label={`Import ${report.goodRows} unit${report.goodRows === 1 ? '' : 's'}`}
              busy={run.isPending}
              onPress={() => send(false)}
              style={styles.commit}
            />
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
    </View>
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
});
