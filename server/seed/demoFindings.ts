/**
 * The demo job's correction-loop data: a few walks with unit checks, and 60 findings in every
 * status (open, fix submitted, closed by re-inspection or on a walk, returned then open with a
 * return count of 1–2, voided) spread over the levels and the three subcontractor companies,
 * each with its full history of events and its fixes (no photos). Due dates are relative to
 * today, so some findings are always overdue. All text is invented. Idempotent: nothing is
 * written when the job already has findings.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { FindingEventKind } from '../../shared/schemas/findings';
import type { FindingStatus, Severity, TradeKey, UnitKindKey } from '../../shared/words';
import type { Database } from '../db';
import { Finding, Fix, Job, UnitCheck, Walk } from '../models';
import { addDays, todayIn } from '../../shared/rules/dates';
import { nextFindingNumber, recordFindingEvent } from '../services/findings';

export const DEMO_FINDING_COUNT = 60;

type SubKey = 'mechanical' | 'electrical' | 'ceilings';

const NOTES = [
  'Drain line sags between the second and third hanger.',
  'Insulation split at the elbow above the corridor door.',
  'Condensate pump cover left off after start-up.',
  'Grille not square to the ceiling grid.',
  'Control wire run loose across the plenum.',
  'Line-set penetration not sealed at the wall.',
  'Missing label on the unit disconnect.',
  'Ceiling tile cut short beside the cassette panel.',
  'Trap holds water after a test fill.',
  'Hanger rod not fastened to the structure.',
];
const FIX_NOTES = [
  'Re-hung the line and added a hanger at mid-span.',
  'Replaced the split section and taped every seam.',
  'Refitted the cover and checked the float switch.',
  'Squared the grille and re-set the grid clips.',
  'Dressed the wire into the tray with ties.',
  'Sealed the penetration with fire-rated sealant.',
  'Fitted the printed label.',
  'Replaced the tile with a full-size cut.',
];
const RETURN_REASONS = [
  'Still holds water at the trap on a second fill.',
  'The new section is not taped at the upper seam.',
  'Photo shows the old cover; the unit on site still has none.',
];
const VOID_REASONS = ['Logged twice on the same walk.', 'Unit removed from the contract by change order.'];

/** A small deterministic sequence, so every demo database gets the same data. */
function picker(seed: number) {
  let s = seed;
  return <T>(list: readonly T[]): T => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return list[s % list.length]!;
  };
}

interface UnitRow {
  id: string;
  level_id: string;
  space_id: string | null;
  kind: UnitKindKey;
  position: number;
}
interface ItemRow {
  id: string;
  trade: TradeKey;
  unit_kinds: UnitKindKey[];
  default_severity: Severity;
}

/** One finding's story: how many returns, and where it ends. */
interface Plan {
  returns: number;
  end: 'open' | 'fix_submitted' | 'accepted' | 'closed_on_walk' | 'voided';
}
const PLANS: Plan[] = [
  { returns: 0, end: 'open' },
  { returns: 0, end: 'open' },
  { returns: 1, end: 'open' },
  { returns: 0, end: 'fix_submitted' },
  { returns: 0, end: 'accepted' },
  { returns: 2, end: 'open' },
  { returns: 1, end: 'fix_submitted' },
  { returns: 0, end: 'closed_on_walk' },
  { returns: 1, end: 'accepted' },
  { returns: 0, end: 'voided' },
];

export async function seedDemoFindings(
  db: Database,
  jobId: string,
  companies: Record<SubKey | 'gc' | 'inspection', string>,
  trades: Record<SubKey, readonly TradeKey[]>,
  users: { gc: string; inspector: string; subs: Record<SubKey, string> },
  transaction: Transaction,
): Promise<boolean> {
  const sequelize = db.sequelize;
  if ((await Finding.count({ where: { jobId }, transaction })) > 0) return false;

  const units = await sequelize.query<UnitRow>(
    `SELECT u.id, u.level_id, u.space_id, u.kind, l.position FROM units u JOIN levels l ON l.id = u.level_id
      WHERE u.job_id = $1 ORDER BY l.position, u.tag`,
    { bind: [jobId], type: QueryTypes.SELECT, transaction },
  );
  const items = await sequelize.query<ItemRow>(
    `SELECT id, trade, unit_kinds, default_severity FROM catalogue_items WHERE job_id = $1 AND retired_at IS NULL ORDER BY position, code`,
    { bind: [jobId], type: QueryTypes.SELECT, transaction },
  );
  if (units.length === 0 || items.length === 0) return false;
  const job = await Job.findByPk(jobId, { transaction });
  const timeZone = job?.timeZone || 'UTC';
  const today = todayIn(timeZone);
  const now = Date.now();
  const day = 24 * 60 * 60 * 1000;
  const pick = picker(2611);

  // A few walks with unit checks on the first three levels that have units.
  const levelIds = [...new Set(units.map((u) => u.level_id))].slice(0, 3);
  const walkIds: Record<string, string> = {};
  for (const [i, levelId] of levelIds.entries()) {
    const startedAt = new Date(now - (21 - i * 3) * day);
    const walk = await Walk.create({ jobId, levelId, inspectorId: users.inspector, startedAt, finishedAt: new Date(startedAt.getTime() + 3 * 60 * 60 * 1000) }, { transaction });
    walkIds[levelId] = walk.id;
    const onLevel = units.filter((u) => u.level_id === levelId).slice(0, 8);
    for (const [j, unit] of onLevel.entries()) {
      await UnitCheck.create(
        { jobId, unitId: unit.id, walkId: walk.id, checkedBy: users.inspector, checkedAt: new Date(startedAt.getTime() + (j + 1) * 10 * 60 * 1000), complete: j % 4 !== 3 },
        { transaction },
      );
    }
  }

  const subKeys: SubKey[] = ['mechanical', 'electrical', 'ceilings'];
  for (let n = 0; n < DEMO_FINDING_COUNT; n++) {
    const sub = subKeys[n % 3]!;
    const plan = PLANS[Math.floor(n / 3) % PLANS.length]!;
    const fitting = items.filter((it) => trades[sub].includes(it.trade));
    const item = fitting.length > 0 ? pick(fitting) : pick(items);
    const candidates = units.filter((u) => item.unit_kinds.includes(u.kind));
    const unit = candidates.length > 0 ? candidates[(n * 7) % candidates.length]! : null;
    const levelId = unit?.level_id ?? units[(n * 5) % units.length]!.level_id;
    // Logged 11 to 30 days ago: room for the longest history (8 events, about 20 h apart) before now.
    const loggedAt = new Date(now - (30 - (n % 20)) * day - (n % 7) * 60 * 60 * 1000);
    // Due dates from 12 days ago to 16 days ahead: about a third of the active ones are overdue.
    const dueOn = addDays(today, ((n * 11) % 29) - 12);
    const severity: Severity = n % 9 === 0 ? 'critical' : item.default_severity;
    const companyId = companies[sub];
    const subUser = users.subs[sub];

    const finding = await Finding.create(
      {
        jobId,
        number: await nextFindingNumber(sequelize, jobId, transaction),
        unitId: unit?.id ?? null,
        spaceId: unit?.space_id ?? null,
        levelId,
        catalogueItemId: item.id,
        walkId: walkIds[levelId] ?? null,
        unitCheckId: null,
        severity,
        companyId,
        dueOn,
        note: pick(NOTES),
        measuredText: null,
        measuredValue: null,
        ruleResult: null,
        loggedBy: users.inspector,
        loggedAt,
        pinX: null,
        pinY: null,
      },
      { transaction },
    );

    // The history, one event at a time, an hour or more apart.
    let at = loggedAt.getTime();
    const later = (hours: number) => {
      at = Math.min(at + hours * 60 * 60 * 1000, now - 60 * 1000);
      return new Date(at);
    };
    const event = (kind: FindingEventKind, actorId: string, from: Record<string, unknown> | null, to: Record<string, unknown>, reason: string | null = null, when = later(20)) =>
      recordFindingEvent({ findingId: finding.id, jobId, actorId, kind, from, to, reason, at: when }, transaction);
    await event('logged', users.inspector, null, { status: 'open', severity, companyId, dueOn }, null, loggedAt);
    let status: FindingStatus = 'open';
    let version = 1;
    const submitFix = async () => {
      const when = later(18);
      const fix = await Fix.create({ jobId, findingId: finding.id, submittedBy: subUser, note: pick(FIX_NOTES), submittedAt: when }, { transaction });
      await event('fix_submitted', subUser, { status: 'open' }, { status: 'fix_submitted', fixId: fix.id, note: fix.note }, null, when);
      status = 'fix_submitted';
      version += 1;
    };
    let returns = 0;
    for (let r = 0; r < plan.returns; r++) {
      await submitFix();
      await event('returned', users.inspector, { status: 'fix_submitted', returnCount: returns }, { status: 'open', returnCount: returns + 1 }, pick(RETURN_REASONS));
      returns += 1;
      status = 'open';
      version += 1;
    }
    let voidedReason: string | null = null;
    if (plan.end === 'fix_submitted' || plan.end === 'accepted') await submitFix();
    if (plan.end === 'accepted') {
      await event('accepted', users.inspector, { status: 'fix_submitted', returnCount: returns }, { status: 'closed', returnCount: returns });
      status = 'closed';
      version += 1;
    } else if (plan.end === 'closed_on_walk') {
      await event('closed_on_walk', users.inspector, { status: 'open' }, { status: 'closed' }, 'Found fixed on the next walk.');
      status = 'closed';
      version += 1;
    } else if (plan.end === 'voided') {
      voidedReason = pick(VOID_REASONS);
      await event('voided', users.gc, { status: 'open' }, { status: 'voided' }, voidedReason);
      status = 'voided';
      version += 1;
    }
    if (n % 8 === 5 && status !== 'voided') {
      await event('comment', subUser, null, {}, 'Ceiling tiles in this area come out on Thursday; fixing then.');
    }
    await finding.update({ status, returnCount: returns, voidedReason, version }, { transaction });
  }
  return true;
}
