/**
 * "Import a room schedule" on the Spaces screen: a CSV chosen or pasted, its columns read from the
 * headers (shared/rules/roomSchedule.ts) or chosen here, the server's preview (new levels, new
 * spaces, changed areas and heights, each line's problem), then one all-or-none write.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import type { UnitSystem } from '../../shared/catalogue/types';
import {
  guessRoomColumns,
  missingRoomFields,
  readRoomSchedule,
  ROOM_FIELD_LABEL,
  ROOM_FIELDS,
  roomRows,
  type RoomColumns,
  type RoomField,
} from '../../shared/rules/roomSchedule';
import { SPACE_IMPORT_MAX_ROWS, type SpaceImportReport } from '../../shared/schemas/setup';
import { ApiError } from '../api/client';
import { writeErrorMessage } from '../api/writeErrors';
import { useApplySpaceImportMutation, usePreviewSpaceImportMutation } from '../queries/spaces';
import { colors, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FilePicker } from '../ui/FilePicker';
import { Notice } from '../ui/Notice';
import { Select } from '../ui/Select';
import { TextField } from '../ui/TextField';

/** Lists longer than this show their first part and how many more. */
const SHOWN = 40;
const FIELD_NOUN: Record<string, string> = { level: 'Level', space: 'Room', area: 'Floor area', height: 'Ceiling height' };

const plural = (n: number, one: string, many: string) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`;

/** "Create 1 level and 3 spaces, update 2" (the parts that are not zero). */
export function applyLabel(report: SpaceImportReport): string {
  const create = [
    report.newLevels.length > 0 ? plural(report.newLevels.length, 'level', 'levels') : null,
    report.created.length > 0 ? plural(report.created.length, 'space', 'spaces') : null,
  ].filter(Boolean);
  const parts = [create.length > 0 ? `Create ${create.join(' and ')}` : null, report.changed.length > 0 ? `update ${report.changed.length}` : null].filter(Boolean);
  const text = parts.join(', ');
  return text.charAt(0).toUpperCase() + text.slice(1);
}

export function RoomImport({ jobId, unitSystem }: { jobId: string; unitSystem: UnitSystem }) {
  const [text, setText] = useState('');
  const [fileName, setFileName] = useState<string | null>(null);
  const [columns, setColumns] = useState<RoomColumns>([]);
  const [report, setReport] = useState<SpaceImportReport | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [pickColumns, setPickColumns] = useState(false);
  const preview = usePreviewSpaceImportMutation(jobId);
  const apply = useApplySpaceImportMutation(jobId);
  const schedule = useMemo(() => readRoomSchedule(text), [text]);
  const rows = useMemo(() => roomRows(schedule.records, schedule.headers, columns), [schedule, columns]);
  const result = useRef<View>(null);

  useEffect(() => {
    // The preview replaces the button pressed: bring its first lines (and any line problems) into view.
    const node = result.current as unknown as { scrollIntoView?: (o: { block: string }) => void } | null;
    if (report) node?.scrollIntoView?.({ block: 'start' });
  }, [report]);

  const load = (next: string, name: string | null) => {
    setText(next);
    setFileName(name);
    setColumns(guessRoomColumns(readRoomSchedule(next).headers));
    setPickColumns(false);
    setReport(null);
    setProblem(null);
    setDone(null);
  };
  const choose = (index: number, field: RoomField | null) => {
    setReport(null);
    setPickColumns(true);
    setColumns((cols) => cols.map((c, i) => (i === index ? field : c === field && field !== null ? null : c)));
  };

  const missing = missingRoomFields(columns);
  const tooMany = rows.length > SPACE_IMPORT_MAX_ROWS;
  const readProblem =
    schedule.error ??
    (schedule.headers.length > 0 && rows.length === 0 ? 'The file has a header row but no rooms.' : null) ??
    (tooMany ? `The file has ${rows.length.toLocaleString('en-US')} rooms; import at most ${SPACE_IMPORT_MAX_ROWS.toLocaleString('en-US')} at a time (split the file).` : null);
  const canPreview = schedule.headers.length > 0 && missing.length === 0 && !readProblem;

  const runPreview = () => {
    setProblem(null);
    setDone(null);
    preview.mutate(rows, {
      onSuccess: setReport,
      onError: (err) => {
        setReport(null);
        setProblem(writeErrorMessage(err));
      },
    });
  };
  const runApply = () => {
    if (!report) return;
    setProblem(null);
    apply.mutate(rows, {
      onSuccess: (r) => {
        const made = [
          r.newLevels.length > 0 ? plural(r.newLevels.length, 'level', 'levels') : null,
          r.created.length > 0 ? plural(r.created.length, 'space', 'spaces') : null,
        ].filter(Boolean);
        const sentence = [made.length > 0 ? `Created ${made.join(' and ')}` : null, r.changed.length > 0 ? `updated ${r.changed.length}` : null].filter(Boolean).join(', ');
        setDone(`${sentence.charAt(0).toUpperCase()}${sentence.slice(1)}.`);
        setReport(null);
        setText('');
        setFileName(null);
        setColumns([]);
      },
      onError: (err) => {
        // Lines refused by the server (changed since the preview): preview again to show them in place.
        if (err instanceof ApiError && err.status === 400 && err.fields && Object.keys(err.fields).some((k) => k.startsWith('rows.'))) runPreview();
        setProblem(writeErrorMessage(err));
      },
    });
  };

  const nothingToDo = report !== null && report.problems.length === 0 && report.newLevels.length === 0 && report.created.length === 0 && report.changed.length === 0;

  return (
    <Card testID="room-import">
      {/* The screen's other panels have no section heading above them: this one is a section (level 2). */}
      <AppText variant="heading" role="heading" aria-level={2}>
        Import a room schedule
      </AppText>
      <AppText variant="small" muted>
        A CSV with a header row and one room per row: level, room number or name, and if you have them floor area and ceiling height. Values
        take the unit in their header (&quot;Area (ft²)&quot;, &quot;Clg ht mm&quot;) or their own (&quot;120 sq ft&quot;, 9&apos; 6&quot;). Levels
        the job lacks are added after its levels; a room the level has gets the area and height the file gives. You see everything before it
        is saved, and either all of it is saved or none.
      </AppText>
      {done ? (
        <Notice tone="success" testID="room-import-done">
          {done}
        </Notice>
      ) : null}
      <View style={styles.row}>
        <FilePicker
          label="Choose a CSV file"
          accept=".csv,.tsv,.txt,text/csv,text/plain,text/tab-separated-values"
          testID="room-import-file"
          onText={(t, n) => load(t, n)}
          onError={setProblem}
        />
        {fileName ? (
          <AppText variant="small" testID="room-import-file-name">
            {fileName}
          </AppText>
        ) : null}
      </View>
      <TextField
        label="…or paste the schedule here"
        testID="room-import-csv"
        multiline
        value={text}
        onChangeText={(t) => load(t, null)}
        placeholder={'Level,Room,Area (ft²),Ceiling height\nLevel 1,101,180,9\' 6"\nLevel 1,102,140,9\' 6"'}
        style={styles.paste}
        autoCapitalize="none"
        autoCorrect={false}
        error={readProblem ?? undefined}
      />

      {schedule.headers.length > 0 ? (
        <View style={styles.section} testID="room-import-columns">
          {missing.length > 0 || pickColumns ? (
            <>
              <AppText variant="label">{`Which column holds what? (${plural(rows.length, 'room', 'rooms')})`}</AppText>
              <View style={styles.columns}>
                {schedule.headers.map((h, i) => (
                  <View key={`${h}-${i}`} style={styles.column}>
                    <Select
                      compact
                      label={h || `Column ${i + 1}`}
                      testID={`room-import-map-${i}`}
                      value={columns[i] ?? ''}
                      placeholder="Ignore"
                      options={ROOM_FIELDS.map((f) => ({ value: f, label: ROOM_FIELD_LABEL[f] }))}
                      onChange={(v) => choose(i, (v || null) as RoomField | null)}
                    />
                  </View>
                ))}
              </View>
            </>
          ) : (
            // Every needed column was read from its header: said in one line on a phone, changed on request.
            <View style={styles.row}>
              <AppText variant="small" style={styles.grow} testID="room-import-columns-read">
                {`${plural(rows.length, 'room', 'rooms')}; columns read from the headers: ${schedule.headers
                  .map((h, i) => `${h || `column ${i + 1}`} → ${columns[i] ? ROOM_FIELD_LABEL[columns[i]!].toLowerCase() : 'ignored'}`)
                  .join(', ')}.`}
              </AppText>
              <Button label="Change columns" tone="quiet" testID="room-import-change-columns" onPress={() => setPickColumns(true)} />
            </View>
          )}
          {missing.length > 0 ? (
            <Notice tone="caution" testID="room-import-missing">
              {`Choose the column that holds the ${missing.map((f) => (f === 'space' ? 'room number or name' : 'level')).join(' and the ')}.`}
            </Notice>
          ) : null}
          <View style={styles.row}>
            <Button testID="room-import-preview" label="Preview" tone={report ? 'secondary' : 'primary'} disabled={!canPreview} busy={preview.isPending} onPress={runPreview} />
          </View>
        </View>
      ) : null}

      {problem ? (
        <Notice tone="error" testID="room-import-problem">
          {problem}
        </Notice>
      ) : null}

      {report ? (
        <View ref={result} style={styles.section} testID="room-import-preview-result">
          <AppText variant="heading" role="heading">
            Preview
          </AppText>
          <RoomImportPreview report={report} unitSystem={unitSystem} />
          {nothingToDo ? (
            <Notice tone="info" testID="room-import-nothing">
              Nothing to change: the job already has these rooms with these sizes.
            </Notice>
          ) : null}
          {report.problems.length === 0 && !nothingToDo ? (
            <Button testID="room-import-apply" label={applyLabel(report)} busy={apply.isPending} onPress={runApply} style={styles.apply} />
          ) : null}
        </View>
      ) : null}
    </Card>
  );
}

/** What the import would do, problems first (nothing is saved while a line has one). */
export function RoomImportPreview({ report, unitSystem }: { report: SpaceImportReport; unitSystem: UnitSystem }) {
  const area = (v: number | null | undefined) => (v == null ? 'not set' : formatQuantity(v, 'area', unitSystem));
  const height = (v: number | null | undefined) => (v == null ? 'not set' : formatQuantity(v, 'length', unitSystem));
  const where = (r: { line: number | null; row: number }) => (r.line ? `Line ${r.line}` : `Row ${r.row + 1}`);
  return (
    <View style={styles.section}>
      {report.problems.length > 0 ? (
        <Notice tone="error" title={`${plural(new Set(report.problems.map((p) => p.row)).size, 'line has a problem', 'lines have problems')}: fix the file and preview again`} testID="room-import-problems">
          <View role="list" style={styles.list}>
            {report.problems.slice(0, SHOWN).map((p) => (
              <AppText key={p.field} role="listitem" variant="small" testID={`room-import-problem-${p.field}`}>
                {`${where(p)}, ${FIELD_NOUN[p.field.split('.')[2] ?? ''] ?? p.field}: ${p.message}`}
              </AppText>
            ))}
            <More count={report.problems.length} />
          </View>
        </Notice>
      ) : null}
      <Part title={plural(report.newLevels.length, 'new level', 'new levels')} testID="room-import-new-levels" empty={report.newLevels.length === 0}>
        <AppText variant="small">{report.newLevels.join(', ')} (added after the job&apos;s levels, in this order)</AppText>
      </Part>
      <Part title={plural(report.created.length, 'new space', 'new spaces')} testID="room-import-created" empty={report.created.length === 0}>
        {report.created.slice(0, SHOWN).map((c) => (
          <AppText key={c.row} role="listitem" variant="small">
            {`${c.level} · ${c.space}: area ${area(c.floorArea)}, ceiling ${height(c.ceilingHeight)}`}
          </AppText>
        ))}
        <More count={report.created.length} />
      </Part>
      <Part title={plural(report.changed.length, 'space changes', 'spaces change')} testID="room-import-changed" empty={report.changed.length === 0}>
        {report.changed.slice(0, SHOWN).map((c) => (
          <AppText key={c.row} role="listitem" variant="small">
            {[
              `${c.level} · ${c.space}:`,
              c.floorArea ? `area ${area(c.floorArea.from)} → ${area(c.floorArea.to)}` : null,
              c.ceilingHeight ? `ceiling ${height(c.ceilingHeight.from)} → ${height(c.ceilingHeight.to)}` : null,
            ]
              .filter(Boolean)
              .join(' ')}
          </AppText>
        ))}
        <More count={report.changed.length} />
      </Part>
      {report.unchanged.length > 0 ? (
        <AppText variant="small" muted testID="room-import-unchanged">
          {`${plural(report.unchanged.length, 'space is', 'spaces are')} already as the file gives ${report.unchanged.length === 1 ? 'it' : 'them'}.`}
        </AppText>
      ) : null}
    </View>
  );
}

function Part({ title, testID, empty, children }: { title: string; testID: string; empty: boolean; children: React.ReactNode }) {
  if (empty) return null;
  return (
    <View style={styles.part} testID={testID}>
      <AppText variant="label">{title}</AppText>
      <View role="list" style={styles.list}>
        {children}
      </View>
    </View>
  );
}

function More({ count }: { count: number }) {
  return count > SHOWN ? (
    <AppText variant="small" muted>
      {`…and ${(count - SHOWN).toLocaleString('en-US')} more.`}
    </AppText>
  ) : null;
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.md },
  section: { gap: space.sm },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 220, minWidth: 0 },
  part: { gap: 2, borderLeftWidth: 3, borderLeftColor: colors.line, paddingLeft: space.sm },
  list: { gap: 2 },
  paste: { minHeight: 110, paddingTop: space.sm, textAlignVertical: 'top', fontFamily: 'monospace', fontSize: 14 },
  columns: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  column: { flexGrow: 1, flexBasis: 180, minWidth: 0 },
  apply: { alignSelf: 'flex-start' },
});
