import { StyleSheet, View } from 'react-native';
import { formatQuantity } from '../../shared/calc/format';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { UnitImportReport, UnitImportRowError } from '../../shared/schemas/setup';
import { unitKindLabel } from '../../shared/words';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Badge } from '../ui/Badge';
import { Notice } from '../ui/Notice';

const FIELD_LABEL: Record<string, string> = {
  tag: 'Tag',
  kind: 'Unit kind',
  model: 'Model',
  capacity: 'Capacity',
  level: 'Level',
  space: 'Space',
  system: 'System',
  crew: 'Crew',
  crewCompany: "Crew's company",
  mount: 'Mounting',
};

/** "Level: Unknown level …", without saying the field twice when the reason already names it. */
export function reasonText(e: UnitImportRowError): string {
  const label = e.field ? (FIELD_LABEL[e.field] ?? e.field) : null;
  if (!label || e.reason.toLowerCase().startsWith(`${label.toLowerCase()}:`)) return e.reason;
  return `${label}: ${e.reason}`;
}

const ACTION_WORDS = { add: 'New:', change: 'Changed:', same: 'Unchanged:' } as const;

const units = (n: number) => `${n} unit${n === 1 ? '' : 's'}`;

/** "Every row reads well. Import adds 1 unit and changes 2 at once." */
function readyText(report: UnitImportReport): string {
  const r = report.revision;
  if (!r || (r.changed.length === 0 && r.untouched === 0)) return `Every row reads well. Import adds all ${report.goodRows} units at once.`;
  const parts = [r.added > 0 ? `adds ${units(r.added)}` : null, r.changed.length > 0 ? `changes ${units(r.changed.length)}` : null].filter(Boolean);
  return parts.length === 0 ? 'Every row reads well, and nothing in the file differs from the register.' : `Every row reads well. Import ${parts.join(' and ')} at once.`;
}

function doneText(report: UnitImportReport): string {
  const r = report.revision;
  const parts = [
    `${units(report.created)} added`,
    r && r.changed.length > 0 ? `${units(r.changed.length)} changed` : null,
    r && r.removed > 0 ? `${units(r.removed)} deleted` : null,
  ].filter(Boolean);
  if (parts.length === 1) return `${report.created} unit${report.created === 1 ? ' was' : 's were'} added to the register.`;
  return `${parts.join(', ')}. You can undo this import while none of its units has a check or a finding.`;
}

/** How many preview rows to list on screen (the server sends up to 500). */
export const PREVIEW_ROWS_SHOWN = 10;

/**
 * The answer to a preview or an import: counts, every bad row with its line number and reason,
 * and the first good rows as they would be imported.
 */
export function ImportReportView({ report, unitSystem }: { report: UnitImportReport; unitSystem: UnitSystem }) {
  const bad = report.errors.length > 0;
  // Against units already in the job, a new unit is named as new too.
  const revising = report.revision ? report.revision.changed.length > 0 || report.revision.untouched > 0 : false;
  return (
    <View style={styles.box} testID="import-report">
      <View style={styles.counts}>
        <Badge label={`${report.totalRows} row${report.totalRows === 1 ? '' : 's'} read`} tone="neutral" testID="import-total" />
        <Badge label={`${report.goodRows} good`} tone="good" testID="import-good" />
        <Badge label={`${report.badRows} bad`} tone={report.badRows > 0 ? 'bad' : 'neutral'} testID="import-bad" />
      </View>
      {report.committed ? (
        <Notice tone="success" title="Imported" testID="import-done">
          {doneText(report)}
        </Notice>
      ) : bad ? (
        <Notice tone="error" title={`Nothing was imported: ${report.badRows} row${report.badRows === 1 ? ' needs' : 's need'} fixing`} testID="import-refused">
          Fix these rows in the file (line numbers count the header as line 1), then preview again. Either every row is imported or none.
        </Notice>
      ) : (
        <Notice tone="info" title="Ready to import" testID="import-ready">
          {readyText(report)}
        </Notice>
      )}
      {bad ? (
        <View style={styles.errors} testID="import-bad-rows" role="list">
          {report.errors.map((e, i) => (
            <View key={`${e.line}-${e.field ?? ''}-${i}`} style={styles.errorRow} testID={`import-bad-row-${e.line}`} role="listitem">
              <AppText variant="label" style={styles.line}>
                Line {e.line}
              </AppText>
              <AppText style={styles.reason}>{reasonText(e)}</AppText>
            </View>
          ))}
        </View>
      ) : null}
      {!report.committed && report.preview.length > 0 ? (
        <View style={styles.preview} testID="import-preview">
          <AppText variant="label">
            {bad ? 'Good rows' : 'First rows'} as they would be imported
            {report.preview.length > PREVIEW_ROWS_SHOWN ? ` (first ${PREVIEW_ROWS_SHOWN} of ${report.goodRows})` : ''}
          </AppText>
          {report.preview.slice(0, PREVIEW_ROWS_SHOWN).map((r) => (
            <View key={r.line} style={styles.previewRow}>
              <AppText variant="small" muted style={styles.line}>
                Line {r.line}
              </AppText>
              <AppText variant="small" style={styles.reason}>
                {r.action && (r.action !== 'add' || revising) ? `${ACTION_WORDS[r.action]} ` : ''}
                <AppText variant="label">{r.tag}</AppText> · {unitKindLabel(r.kind)}
                {r.modelName ? ` · ${r.modelName}` : ''}
                {r.capacity !== null ? ` · ${formatQuantity(r.capacity, 'capacity', unitSystem)}` : ''} · {r.levelName}
                {r.spaceName ? ` · ${r.spaceName}` : ''}
                {r.systemName ? ` · ${r.systemName}` : ''}
                {r.crewName ? ` · installed by ${r.crewName}` : ''}
                {r.mountPosition ? ` · ${r.mountPosition}-mounted` : ''}
              </AppText>
            </View>
          ))}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.md },
  counts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  errors: { borderWidth: 1, borderColor: colors.danger, borderRadius: radius.md, backgroundColor: colors.surface, overflow: 'hidden' },
  errorRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, padding: space.md, borderBottomWidth: 1, borderBottomColor: colors.line },
  line: { minWidth: 64 },
  reason: { flexShrink: 1, flexBasis: 220, flexGrow: 1 },
  preview: { gap: space.xs },
  previewRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, paddingVertical: 2 },
});
