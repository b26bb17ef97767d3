/**
 * What Trimout computed for a record, beside what was typed: the pressure change as read and
 * corrected for temperature side by side, the hold, each limit with its source; the decay test; the
 * charge from the lengths and the factors; the drain test's answers; the start-up's temperature
 * differences. The figures are the server's (TestRecordDto.figures); nothing is recomputed here.
 */
import { StyleSheet, View } from 'react-native';
import { paToGauge } from '../../shared/calc/testRecords';
import type { SourcedFigure } from '../../shared/calc/testRecords';
import type { TestRecordDto } from '../../shared/schemas/testRecords';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { duration, figure, mass, signed, temperatureDifference } from './format';
import { Row } from './parts';

/** "Job setting: Site survey 2026"; a default's source already says it is Trimout's default, and where it comes from. */
function sourceWords(f: { source: string; from?: SourcedFigure['from'] }): string {
  return f.from === 'job' ? `Job setting: ${f.source}` : f.source;
}

function Check({ ok, label, testID }: { ok: boolean | null; label: string; testID?: string }) {
  if (ok === null) return null;
  return (
    <AppText variant="small" testID={testID} style={{ color: ok ? colors.good : colors.danger }}>
      {ok ? '✓' : '✗'} {label}
    </AppText>
  );
}

export function TestFigures({ record, unitSystem = 'metric', testID = 'test-figures' }: { record: TestRecordDto; unitSystem?: 'metric' | 'imperial'; testID?: string }) {
  switch (record.kind) {
    case 'pressure':
      return <PressureFigures record={record} testID={testID} />;
    case 'evacuation':
      return <EvacuationFigures record={record} testID={testID} />;
    case 'charge':
      return <ChargeFigures record={record} unitSystem={unitSystem} testID={testID} />;
    case 'drain':
      return <DrainFigures record={record} testID={testID} />;
    case 'startup':
      return <StartupFigures record={record} testID={testID} />;
  }
}

type Of<K extends TestRecordDto['kind']> = Extract<TestRecordDto, { kind: K }>;

function PressureFigures({ record, testID }: { record: Of<'pressure'>; testID: string }) {
  const f = record.figures;
  const d = record.data;
  const u = f.unit;
  const p = (value: number, digits = 2) => `${figure(value, digits)} ${u}`;
  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        Pressure
      </AppText>
      <View style={styles.sideBySide} testID={`${testID}-changes`}>
        <View style={styles.cell} testID={`${testID}-uncorrected`}>
          <AppText variant="label" muted>
            Change as read
          </AppText>
          <AppText variant="heading">{`${signed(f.uncorrectedChange.value)} ${u}`}</AppText>
          <AppText variant="small" muted>
            {d.startPressure} → {d.endPressure}
          </AppText>
        </View>
        <View style={[styles.cell, styles.cellMain]} testID={`${testID}-corrected`}>
          <AppText variant="label" muted>
            Corrected for temperature
          </AppText>
          <AppText variant="heading">{`${signed(f.correctedChange.value)} ${u}`}</AppText>
          <AppText variant="small" muted>
            {d.startTemperature} → {d.endTemperature}; expected end {p(f.expectedEnd.value)}
          </AppText>
        </View>
      </View>
      <AppText variant="small" muted>
        Corrected: the end reading against the start pressure carried to the end temperature (P₂ = P₁ × T₂ / T₁, absolute pressures and temperatures; the ideal gas law at
        constant volume). Negative is a drop.
      </AppText>
      <Row label="Allowed drop" testID={`${testID}-allowed`}>
        <AppText>{p(f.allowedDrop.valueInUnit)}</AppText>
        <AppText variant="small" muted>
          {sourceWords(f.allowedDrop)}
        </AppText>
      </Row>
      <Row label="Target pressure" testID={`${testID}-target`}>
        <AppText>{f.target.text}</AppText>
        <AppText variant="small" muted>
          {f.target.source}
        </AppText>
        <Check ok={f.reachedTarget} label={f.reachedTarget ? 'The start reached the target.' : 'The start is below the target.'} />
      </Row>
      <Row label="Hold" testID={`${testID}-hold`}>
        <AppText>{duration(f.holdMinutes)}</AppText>
        {f.minHold ? (
          <AppText variant="small" muted>
            At least {duration(f.minHold.value)} ({sourceWords(f.minHold)})
          </AppText>
        ) : (
          <AppText variant="small" muted>
            The job sets no minimum hold.
          </AppText>
        )}
        <Check ok={f.heldLongEnough} label={f.heldLongEnough ? 'Held long enough.' : 'Held too briefly.'} />
      </Row>
      <Row label="Atmosphere" testID={`${testID}-atmosphere`}>
        <AppText>{figure(f.atmospheric.value / 1000, 3)} kPa</AppText>
        <AppText variant="small" muted>
          {sourceWords(f.atmospheric)}
        </AppText>
      </Row>
      <Row label="Gauge">
        <AppText>
          {d.gauge.identifier}, calibrated {d.gauge.calibratedOn}, step {p(paToGauge(f.gaugeResolution.pa, u), 3)}
        </AppText>
      </Row>
      <Row label="Medium">{d.medium === 'nitrogen_with_trace_gas' ? 'Nitrogen with trace gas' : d.medium === 'dry_air' ? 'Dry air' : d.medium === 'nitrogen' ? 'Nitrogen' : 'Other'}</Row>
      {d.section ? <Row label="Part tested">{d.section}</Row> : null}
    </Card>
  );
}

function EvacuationFigures({ record, testID }: { record: Of<'evacuation'>; testID: string }) {
  const f = record.figures;
  const d = record.data;
  const microns = (n: number) => `${figure(n, 0)} microns`;
  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        Evacuation
      </AppText>
      <Row label="Deepest" testID={`${testID}-deepest`}>
        <AppText>
          {d.deepestReading}
          {f.typedUnits.deepest === 'micron' ? '' : ` (${microns(f.deepest.microns)})`}
        </AppText>
        <AppText variant="small" muted>
          Target {microns(f.target.microns)} ({sourceWords(f.target)})
        </AppText>
        <Check ok={f.reachedTarget} label={f.reachedTarget ? 'Reached the target.' : 'Did not reach the target.'} />
      </Row>
      <Row label="Decay test" testID={`${testID}-decay`}>
        <AppText>
          {d.isolatedReading} → {d.afterHoldReading} over {duration(f.holdMinutes)}: rise {microns(f.rise.microns)}
        </AppText>
        <AppText variant="small" muted>
          At most {microns(f.riseLimit.microns)} ({sourceWords(f.riseLimit)}); hold at least {duration(f.minHold.value)} ({sourceWords(f.minHold)})
        </AppText>
        <Check ok={f.riseWithinLimit} label={f.riseWithinLimit ? 'Rise within the limit.' : 'Rose more than the limit.'} />
        <Check ok={f.heldLongEnough} label={f.heldLongEnough ? 'Held long enough.' : 'Held too briefly.'} />
      </Row>
      {d.gaugeIdentifier ? <Row label="Gauge">{d.gaugeIdentifier}</Row> : null}
    </Card>
  );
}

function ChargeFigures({ record, unitSystem, testID }: { record: Of<'charge'>; unitSystem: 'metric' | 'imperial'; testID: string }) {
  const f = record.figures;
  const d = record.data;
  const m = (kg: number) => mass(kg, unitSystem);
  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        Charge
      </AppText>
      <Row label="Factory charge" testID={`${testID}-factory`}>
        {f.factoryCharge ? (
          <>
            <AppText>{m(f.factoryCharge.value)}</AppText>
            <AppText variant="small" muted>
              {sourceWords(f.factoryCharge)}
            </AppText>
          </>
        ) : (
          <AppText muted>Not entered with its source on the system.</AppText>
        )}
      </Row>
      {f.lines.map((l, i) => (
        <Row key={`${l.size}-${i}`} label={`Liquid line ${l.size}`} testID={`${testID}-line-${i}`}>
          <AppText>
            {d.liquidLines[i]?.length ?? `${figure(l.lengthMm / 1000, 2)} m`}
            {l.factor && l.additionalKg !== null ? ` × ${l.factor.text} = ${m(l.additionalKg)}` : ''}
          </AppText>
          <AppText variant="small" muted>
            {l.factor ? l.factor.source : 'No factor for this size on the system: the additional charge is unknown.'}
          </AppText>
        </Row>
      ))}
      <Row label="Additional (from the lengths)" testID={`${testID}-additional`}>
        {f.additionalKg === null ? <AppText muted>Unknown: no factor for {f.missingFactors.join(', ')}.</AppText> : <AppText>{m(f.additionalKg)}</AppText>}
      </Row>
      <Row label="Weighed in" testID={`${testID}-weighed`}>
        <AppText>
          {d.weighedIn}
          {` (${m(f.weighedInKg)})`}
        </AppText>
      </Row>
      <Row label="Difference" testID={`${testID}-difference`}>
        {f.differenceKg === null ? (
          <AppText muted>Unknown while a factor is missing.</AppText>
        ) : (
          <>
            <AppText variant="heading">{`${f.differenceKg > 0 ? '+' : ''}${m(f.differenceKg)}`}</AppText>
            <AppText variant="small" muted>
              Weighed in minus the additional charge the lengths call for (positive: more went in).
            </AppText>
          </>
        )}
      </Row>
      <Row label="System now holds" testID={`${testID}-total`}>
        {f.totalChargeKg === null ? <AppText muted>Unknown without the factory charge.</AppText> : <AppText>{m(f.totalChargeKg)} (factory + weighed in)</AppText>}
      </Row>
      {d.scaleIdentifier ? <Row label="Scale">{d.scaleIdentifier}</Row> : null}
    </Card>
  );
}

const yesNo = (v: boolean | null | undefined) => (v === true ? 'Yes' : v === false ? 'No' : 'Not answered');

function DrainFigures({ record, testID }: { record: Of<'drain'>; testID: string }) {
  const d = record.data;
  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        Drain
      </AppText>
      <Row label="Water poured">{`${yesNo(d.waterPoured)}${d.waterAmount ? ` (${d.waterAmount})` : ''}`}</Row>
      <Row label="Reaches its termination">{yesNo(d.reachesTermination)}</Row>
      <Row label="Pump">{d.pumpFitted ? `Fitted · runs and lifts: ${yesNo(d.pumpRunsAndLifts)}` : 'None fitted'}</Row>
      <Row label="Overflow or float switch">{d.floatSwitchFitted ? `Fitted · stops the unit: ${yesNo(d.floatSwitchStopsUnit)}` : 'None fitted'}</Row>
      <Row label="No leak at joints">{yesNo(d.noLeakAtJoints)}</Row>
      {record.figures.needsPower ? (
        <AppText variant="small" muted testID={`${testID}-power`}>
          Proven with the unit powered (pump or switch): counts toward the system’s acceptance.
        </AppText>
      ) : null}
    </Card>
  );
}

function StartupFigures({ record, testID }: { record: Of<'startup'>; testID: string }) {
  const f = record.figures;
  const d = record.data;
  return (
    <Card testID={testID}>
      <AppText variant="title" role="heading">
        Start-up
      </AppText>
      <Row label="Mode">{f.mode === 'cooling' ? 'Cooling' : f.mode === 'heating' ? 'Heating' : 'Fan'}</Row>
      <Row label="Technician">{d.technician}</Row>
      {f.units.map((u, i) => {
        const typed = d.units.find((x) => x.unitId === u.unitId);
        return (
          <Row key={u.unitId} label={`Unit ${u.tag ?? '?'}`} testID={`${testID}-unit-${i}`}>
            <AppText style={{ color: u.ok ? colors.ink : colors.danger }}>
              {u.ok ? '✓ Answers, addressed, no fault' : `✗ ${[typed && !typed.answers ? 'does not answer' : null, typed && !typed.addressed ? 'not addressed' : null, typed?.faultShown ? `fault ${typed.faultCode ?? 'shown'}` : null].filter(Boolean).join(', ')}`}
              {typed?.address ? ` · address ${typed.address}` : ''}
            </AppText>
            {u.differenceK !== null ? (
              <AppText variant="small">
                Return {typed?.returnTemperature} − supply {typed?.supplyTemperature} = {temperatureDifference(u.differenceK)}
              </AppText>
            ) : (
              <AppText variant="small" muted>
                No supply and return temperatures recorded.
              </AppText>
            )}
          </Row>
        );
      })}
      {f.missingUnits.length ? (
        <AppText variant="small" style={{ color: colors.danger }} testID={`${testID}-missing`}>
          Not on the record: {f.missingUnits.map((u) => u.tag).join(', ')}
        </AppText>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  sideBySide: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  cell: { flexGrow: 1, flexBasis: 140, padding: space.sm, borderRadius: radius.sm, backgroundColor: colors.paper, gap: 2 },
  cellMain: { borderWidth: 1.5, borderColor: colors.spruce },
});
