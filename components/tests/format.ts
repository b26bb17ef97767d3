/**
 * Times and figures of test records as the screens show them. A record's start and end are typed
 * as wall-clock time on the job's clock ("2026-12-01 08:00") and sent as instants (UTC).
 */
import type { TestBlocker, TestRecordKind, TestResult } from '../../shared/schemas/testRecords';
import { TEST_RECORD_KIND_LABELS } from '../../shared/schemas/testRecords';

const LOCAL = /^(\d{4})-(\d{2})-(\d{2})[ T](\d{1,2}):(\d{2})$/;

/** The zone's offset from UTC at an instant, in minutes (unknown zone: UTC). */
function offsetMinutes(at: number, timeZone: string): number {
  let parts: Intl.DateTimeFormatPart[];
  try {
    parts = new Intl.DateTimeFormat('en-GB', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).formatToParts(new Date(at));
  } catch {
    return 0;
  }
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value ?? 0);
  const wall = Date.UTC(get('year'), get('month') - 1, get('day'), get('hour'), get('minute'));
  return Math.round((wall - Math.floor(at / 60000) * 60000) / 60000);
}

/** "2026-12-01 08:00" on the job's clock → "2026-12-01T13:00:00.000Z"; anything else is returned as typed (the schema says what is wrong). */
export function localToInstant(text: string, timeZone: string): string {
  const m = LOCAL.exec(text.trim());
  if (!m) return text.trim();
  const [y, mo, d, h, mi] = m.slice(1).map(Number) as [number, number, number, number, number];
  const wall = Date.UTC(y, mo - 1, d, h, mi);
  if (Number.isNaN(wall) || mo > 12 || d > 31 || h > 23 || mi > 59) return text.trim();
  // Twice: the offset at the first guess may differ across a daylight-saving change.
  let at = wall - offsetMinutes(wall, timeZone) * 60000;
  at = wall - offsetMinutes(at, timeZone) * 60000;
  return new Date(at).toISOString();
}

/** An instant as wall-clock text on the job's clock ("2026-12-01 08:00"). */
export function instantToLocal(iso: string | Date, timeZone: string): string {
  const at = typeof iso === 'string' ? Date.parse(iso) : iso.getTime();
  const wall = new Date(at + offsetMinutes(at, timeZone) * 60000).toISOString();
  return `${wall.slice(0, 10)} ${wall.slice(11, 16)}`;
}

/** A figure with at most `digits` decimals, a true minus sign and no "-0". */
export function figure(n: number, digits = 2): string {
  const f = Number(n.toFixed(digits));
  const s = Math.abs(f).toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: 0 });
  return f < 0 ? `−${s}` : s;
}

/** A change with its sign: "+1.2", "−21", "0". */
export function signed(n: number, digits = 2): string {
  const f = Number(n.toFixed(digits));
  return f > 0 ? `+${figure(f, digits)}` : figure(f, digits);
}

/** "24 h", "1 h 30 min", "15 min". */
export function duration(minutes: number): string {
  const m = Math.round(minutes);
  if (m < 60) return `${m}\u00a0min`;
  const h = Math.floor(m / 60);
  const rest = m % 60;
  return rest ? `${h}\u00a0h ${rest}\u00a0min` : `${h}\u00a0h`;
}

const LB_PER_KG = 1 / 0.45359237;

/** "2.7 kg (5.95 lb)" or, imperial, "5.95 lb (2.7 kg)". */
export function mass(kg: number, system: 'metric' | 'imperial' = 'metric'): string {
  const k = `${figure(kg, 2)} kg`;
  const l = `${figure(kg * LB_PER_KG, 2)} lb`;
  return system === 'imperial' ? `${l} (${k})` : `${k} (${l})`;
}

/** A temperature difference in K shown as °C and °F (a difference: no 32 °F offset). */
export function temperatureDifference(k: number): string {
  return `${figure(k, 1)} °C (${figure((k * 9) / 5, 1)} °F)`;
}

export const RESULT_WORDS: Record<TestResult, string> = { passed: 'Passed', failed: 'Failed', recorded: 'Recorded' };

/** "Pressure test", "Drain test" … */
export function kindLabel(kind: TestRecordKind): string {
  return TEST_RECORD_KIND_LABELS[kind] ?? kind;
}

/** The record's subject: "VRF-1", "VRF-1 · Branch B", "unit IU-3-07". */
export function subjectOf(r: { system: { name: string } | null; unit: { tag: string } | null; data?: unknown }): string {
  if (r.unit) return `unit ${r.unit.tag}`;
  const section = r.data && typeof r.data === 'object' && 'section' in r.data && typeof r.data.section === 'string' ? r.data.section : null;
  return [r.system?.name ?? 'system', section].filter(Boolean).join(' · ');
}

/** Which record a readiness blocker waits for, as a key of the form's address. */
export function blockerTarget(b: TestBlocker): { kind: TestRecordKind; systemId?: string; unitId?: string } {
  return b.unitId ? { kind: b.kind, unitId: b.unitId } : { kind: b.kind, systemId: b.systemId ?? undefined };
}
