/**
 * The demo job's correction-loop data: one walk per level with unit checks (lower levels mostly
 * checked, the top level barely started, each with a few units left in progress and some not
 * reached yet), and 60 findings in every status (open, fix submitted, closed by re-inspection or
 * on a walk, returned then open with a return count of 1–2, voided) on checked units of the
 * levels below the top, for the three subcontractor companies, each with its full history of
 * events and its fixes; plus one "Something else" finding. Notes, fix notes and return reasons
 * come from each defect type's own sentences (demoText.ts). The companies differ the way crews
 * do: the electrical crew fixes fast and usually right first time, the ceilings crew is slow and
 * often sent back, so the scorecards have something to show. Fix photos are added afterwards
 * (demoPhotos.ts). Due dates are relative to today, so some findings are always overdue. All text
 * is invented. Idempotent: nothing is written when the job already has findings.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { FindingEventKind } from '../../shared/schemas/findings';
import type { CheckMark, FindingStatus, Severity, TradeKey, UnitKindKey } from '../../shared/words';
import type { Database } from '../db';
import { Finding, Fix, Job, UnitCheck, UnitCheckItem, Walk } from '../models';
import { addDays, todayIn } from '../../shared/rules/dates';
import { nextFindingNumber, recordFindingEvent } from '../services/findings';
import { otherDefectType } from '../services/somethingElse';
import { DEMO_CODES_BY_COMPANY, DEMO_DEFECT_TEXT, DEMO_SOMETHING_ELSE, type DefectText } from './demoText';

export const DEMO_FINDING_COUNT = 60;

type SubKey = 'mechanical' | 'electrical' | 'ceilings';

const VOID_REASONS = ['Logged twice on the same walk.', 'Unit removed from the contract by change order.'];

/** What each company's people say when they comment on a finding they cannot fix yet. */
const WAIT_COMMENTS: Record<SubKey, string> = {
  mechanical: 'Waiting for the ceiling crew to open this area; fixing then.',
  electrical: 'Circuit is live; fixing at the shutdown on Thursday.',
  ceilings: 'Tiles in this area come out on Thursday; fixing then.',
};

/**
 * Hours from a finding (or its return) to the company's fix. Invented round figures that make
 * the scorecards differ: about a day for the electrical crew, two and a half for mechanical,
 * four and a half for ceilings. The inspector's verdict follows a fix after 20 hours.
 */
const FIX_HOURS: Record<SubKey, number> = { electrical: 20, mechanical: 60, ceilings: 110 };
const VERDICT_HOURS = 20;

/**
 * Share of each level's units whose check is complete, from the first level up (invented): the
 * inspector has been through the lower levels, the top one is just started. A level also has a
 * few units whose check is in progress, and the rest are not reached yet.
 */
const CHECKED_SHARE = [0.85, 0.75, 0.65, 0.5, 0.35, 0.15];

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
  tag: string;
  level_id: string;
  space_id: string | null;
  kind: UnitKindKey;
  position: number;
}
interface ItemRow {
  id: string;
  code: string;
  trade: TradeKey;
  unit_kinds: UnitKindKey[];
  default_severity: Severity;
}

/** One finding's story: how many returns, and where it ends. */
interface Plan {
  returns: number;
  end: 'open' | 'fix_submitted' | 'accepted' | 'closed_on_walk' | 'voided';
}
const plan = (end: Plan['end'], returns = 0): Plan => ({ end, returns });
const times = (n: number, p: Plan): Plan[] => Array.from({ length: n }, () => p);

/** Twenty stories per company (the n-th finding of a company gets the n-th), interleaved. */
const PLANS: Record<SubKey, Plan[]> = {
  // Six of seven accepted fixes first time, fast.
  electrical: interleave([
    times(6, plan('accepted')),
    times(4, plan('open')),
    times(3, plan('fix_submitted')),
    [plan('accepted', 1), plan('open', 1), plan('open', 2), plan('fix_submitted', 1), plan('voided')],
    times(2, plan('closed_on_walk')),
  ]),
  // Half the accepted fixes needed a second go.
  mechanical: interleave([
    times(5, plan('open')),
    times(3, plan('accepted')),
    times(3, plan('accepted', 1)),
    times(2, plan('open', 1)),
    times(2, plan('open', 2)),
    times(2, plan('fix_submitted')),
    [plan('fix_submitted', 1), plan('closed_on_walk'), plan('voided')],
  ]),
  // Slow, and most fixes are sent back once.
  ceilings: interleave([
    times(7, plan('open')),
    times(3, plan('accepted', 1)),
    times(3, plan('fix_submitted')),
    times(2, plan('open', 1)),
    times(2, plan('closed_on_walk')),
    [plan('accepted'), plan('fix_submitted', 1), plan('voided')],
  ]),
};

/** Takes one from each list in turn, so a company's stories are mixed over its findings. */
function interleave<T>(lists: T[][]): T[] {
  const out: T[] = [];
  const rest = lists.map((l) => [...l]);
  while (rest.some((l) => l.length > 0)) for (const l of rest) if (l.length > 0) out.push(l.shift()!);
  return out;
}

/** The next sentence of a defect type's list: each type's sentences are used in turn. */
function rotation() {
  const used = new Map<string, number>();
  return (key: string, list: readonly string[]): string => {
    const n = used.get(key) ?? 0;
    used.set(key, n + 1);
    return list[n % list.length]!;
  };
}

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
    `SELECT u.id, u.tag, u.level_id, u.space_id, u.kind, l.position FROM units u JOIN levels l ON l.id = u.level_id
      WHERE u.job_id = $1 ORDER BY l.position, u.tag`,
    { bind: [jobId], type: QueryTypes.SELECT, transaction },
  );
  const items = await sequelize.query<ItemRow>(
    `SELECT id, code, trade, unit_kinds, default_severity FROM catalogue_items
      WHERE job_id = $1 AND retired_at IS NULL AND NOT is_other ORDER BY position, code`,
    { bind: [jobId], type: QueryTypes.SELECT, transaction },
  );
  if (units.length === 0 || items.length === 0) return false;
  const job = await Job.findByPk(jobId, { transaction });
  const timeZone = job?.timeZone || 'UTC';
  const today = todayIn(timeZone);
  const now = Date.now();
  const hour = 60 * 60 * 1000;
  const day = 24 * hour;
  const pick = picker(2611);
  const say = rotation();

  // Each level's units in walking order (by tag): the first ones checked, then a few in progress.
  const levelIds = [...new Set(units.map((u) => u.level_id))];
  const state = new Map<string, 'checked' | 'in_progress'>();
  for (const [i, levelId] of levelIds.entries()) {
    const onLevel = units.filter((u) => u.level_id === levelId);
    const share = CHECKED_SHARE[Math.min(i, CHECKED_SHARE.length - 1)]!;
    const inProgress = Math.max(1, Math.round(onLevel.length / 10));
    const checked = Math.min(Math.floor(onLevel.length * share), onLevel.length - inProgress - 1);
    onLevel.forEach((u, j) => {
      if (j < checked) state.set(u.id, 'checked');
      else if (j < checked + inProgress) state.set(u.id, 'in_progress');
    });
  }

  // The findings' defect types and units, chosen before the walks so each check marks its defects.
  // Findings sit on units that were looked at, on every level but the top one (just started).
  const subKeys: SubKey[] = ['mechanical', 'electrical', 'ceilings'];
  const topLevel = levelIds.at(-1);
  const looked = units.filter((u) => state.has(u.id) && (levelIds.length === 1 || u.level_id !== topLevel));
  const byCode = new Map(items.map((it) => [it.code, it]));
  const taken = new Set<string>();
  const planned = Array.from({ length: DEMO_FINDING_COUNT }, (_, n) => {
    const sub = subKeys[n % 3]!;
    const codes = DEMO_CODES_BY_COMPANY[sub].filter((c) => byCode.has(c));
    const fitting = items.filter((it) => trades[sub].includes(it.trade));
    const item = codes.length > 0 ? byCode.get(pick(codes))! : fitting.length > 0 ? pick(fitting) : pick(items);
    const candidates = looked.filter((u) => item.unit_kinds.includes(u.kind));
    let unit: UnitRow | null = null;
    for (let k = 0; k < candidates.length && !unit; k++) {
      const u = candidates[(n * 7 + k) % candidates.length]!;
      if (!taken.has(`${u.id}|${item.id}`)) unit = u;
    }
    if (unit) taken.add(`${unit.id}|${item.id}`);
    return { n, sub, item, unit };
  });
  const defectsOn = new Map<string, Set<string>>();
  for (const p of planned) if (p.unit) defectsOn.set(p.unit.id, (defectsOn.get(p.unit.id) ?? new Set()).add(p.item.id));

  // One walk per level, a level every three days; ten minutes per unit.
  const walkIds: Record<string, string> = {};
  const checkOf = new Map<string, { id: string; at: Date }>();
  const marks: Array<{ unitCheckId: string; catalogueItemId: string; mark: CheckMark; measuredText: null; measuredValue: null; result: null; position: number }> = [];
  for (const [i, levelId] of levelIds.entries()) {
    const startedAt = new Date(now - (24 - i * 3) * day);
    const onLevel = units.filter((u) => u.level_id === levelId && state.has(u.id));
    const walk = await Walk.create(
      { jobId, levelId, inspectorId: users.inspector, startedAt, finishedAt: new Date(startedAt.getTime() + (onLevel.length + 2) * 10 * 60 * 1000) },
      { transaction },
    );
    walkIds[levelId] = walk.id;
    for (const [j, unit] of onLevel.entries()) {
      const complete = state.get(unit.id) === 'checked';
      const at = new Date(startedAt.getTime() + (j + 1) * 10 * 60 * 1000);
      const check = await UnitCheck.create({ jobId, unitId: unit.id, walkId: walk.id, checkedBy: users.inspector, checkedAt: at, complete }, { transaction });
      checkOf.set(unit.id, { id: check.id, at });
      const applicable = items.filter((it) => it.unit_kinds.includes(unit.kind));
      // A check in progress has its first half marked; the defects are always among the marks.
      const defects = defectsOn.get(unit.id) ?? new Set<string>();
      applicable.forEach((it, position) => {
        if (!complete && position >= applicable.length / 2 && !defects.has(it.id)) return;
        marks.push({ unitCheckId: check.id, catalogueItemId: it.id, mark: defects.has(it.id) ? 'defect' : 'ok', measuredText: null, measuredValue: null, result: null, position });
      });
    }
  }
  await UnitCheckItem.bulkCreate(marks, { transaction });

  for (const { n, sub, item, unit } of planned) {
    const story = PLANS[sub][Math.floor(n / 3) % PLANS[sub].length]!;
    const text: DefectText = DEMO_DEFECT_TEXT[item.code] ?? { notes: ['Logged on the walk.'], fixes: ['Fixed as the finding asks.'], returns: ['Not fixed as the finding asks.'] };
    const levelId = unit?.level_id ?? units[(n * 5) % units.length]!.level_id;
    const check = unit ? checkOf.get(unit.id) : undefined;
    // Logged during the walk, minutes after the unit's check.
    const loggedAt = new Date((check?.at.getTime() ?? now - 20 * day) + 5 * 60 * 1000);
    // Due dates from 12 days ago to 16 days ahead: about a third of the active ones are overdue.
    const dueOn = addDays(today, ((n * 11) % 29) - 12);
    await tellStory({
      sub,
      story,
      item: { id: item.id, severity: item.default_severity },
      title: null,
      unit,
      levelId,
      walkId: walkIds[levelId] ?? null,
      unitCheckId: check?.id ?? null,
      loggedAt,
      dueOn,
      note: say(`${item.code}:note`, text.notes),
      fixNote: () => say(`${item.code}:fix`, text.fixes),
      returnReason: () => say(`${item.code}:return`, text.returns),
      voidReason: () => pick(VOID_REASONS),
      comment: n % 8 === 5,
      waitingDays: 1 + (n % 4),
    });
  }

  // One "Something else": a defect the catalogue does not list, fixed and waiting for re-inspection.
  const other = await otherDefectType(jobId, transaction);
  const unit = looked.find((u) => u.kind === 'cassette_4way') ?? looked[0] ?? units[0]!;
  const check = checkOf.get(unit.id);
  await tellStory({
    sub: 'mechanical',
    story: plan('fix_submitted'),
    item: { id: other.id, severity: 'minor' },
    title: DEMO_SOMETHING_ELSE.title,
    unit,
    levelId: unit.level_id,
    walkId: walkIds[unit.level_id] ?? null,
    unitCheckId: check?.id ?? null,
    loggedAt: new Date((check?.at.getTime() ?? now - 20 * day) + 7 * 60 * 1000),
    dueOn: addDays(today, 5),
    note: DEMO_SOMETHING_ELSE.note,
    fixNote: () => DEMO_SOMETHING_ELSE.fix,
    returnReason: () => '',
    voidReason: () => '',
    comment: false,
    waitingDays: 2,
  });
  return true;

  interface Story {
    sub: SubKey;
    story: Plan;
    item: { id: string; severity: Severity };
    title: string | null;
    unit: UnitRow | null;
    levelId: string;
    walkId: string | null;
    unitCheckId: string | null;
    loggedAt: Date;
    dueOn: string;
    note: string;
    fixNote: () => string;
    returnReason: () => string;
    voidReason: () => string;
    comment: boolean;
    /** Days a fix still waiting for re-inspection has waited (at most). */
    waitingDays: number;
  }

  /** One finding and its history, one event at a time. */
  async function tellStory(s: Story): Promise<void> {
    const { sub, story, loggedAt, dueOn } = s;
    const severity = s.item.severity;
    const companyId = companies[sub];
    const subUser = users.subs[sub];
    const finding = await Finding.create(
      {
        jobId,
        number: await nextFindingNumber(sequelize, jobId, transaction),
        unitId: s.unit?.id ?? null,
        spaceId: s.unit?.space_id ?? null,
        levelId: s.levelId,
        catalogueItemId: s.item.id,
        title: s.title,
        walkId: s.walkId,
        unitCheckId: s.unitCheckId,
        severity,
        companyId,
        dueOn,
        note: s.note,
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

    let at = loggedAt.getTime();
    const later = (hours: number) => {
      at = Math.min(at + hours * hour, now - 60 * 1000);
      return new Date(at);
    };
    const event = (kind: FindingEventKind, actorId: string, from: Record<string, unknown> | null, to: Record<string, unknown>, reason: string | null, when: Date) =>
      recordFindingEvent({ findingId: finding.id, jobId, actorId, kind, from, to, reason, at: when }, transaction);
    await event('logged', users.inspector, null, { status: 'open', severity, companyId, dueOn }, null, loggedAt);
    let status: FindingStatus = 'open';
    let version = 1;
    const submitFix = async (last = false) => {
      let when = later(FIX_HOURS[sub]);
      // A fix still waiting for its re-inspection was sent in the last few days: inspectors do not
      // leave fixes for weeks, and the scorecards' "longest waiting" should look like a real job.
      if (last && story.end === 'fix_submitted' && when.getTime() < now - s.waitingDays * day) {
        at = now - s.waitingDays * day;
        when = new Date(at);
      }
      const fix = await Fix.create({ jobId, findingId: finding.id, submittedBy: subUser, note: s.fixNote(), submittedAt: when }, { transaction });
      await event('fix_submitted', subUser, { status: 'open' }, { status: 'fix_submitted', fixId: fix.id, note: fix.note }, null, when);
      status = 'fix_submitted';
      version += 1;
    };
    let returns = 0;
    for (let r = 0; r < story.returns; r++) {
      await submitFix();
      await event('returned', users.inspector, { status: 'fix_submitted', returnCount: returns }, { status: 'open', returnCount: returns + 1 }, s.returnReason(), later(VERDICT_HOURS));
      returns += 1;
      status = 'open';
      version += 1;
    }
    let voidedReason: string | null = null;
    if (story.end === 'fix_submitted' || story.end === 'accepted') await submitFix(true);
    if (story.end === 'accepted') {
      await event('accepted', users.inspector, { status: 'fix_submitted', returnCount: returns }, { status: 'closed', returnCount: returns }, null, later(VERDICT_HOURS));
      status = 'closed';
      version += 1;
    } else if (story.end === 'closed_on_walk') {
      await event('closed_on_walk', users.inspector, { status: 'open' }, { status: 'closed' }, 'Found fixed when the inspector came back to the unit.', later(VERDICT_HOURS * 3));
      status = 'closed';
      version += 1;
    } else if (story.end === 'voided') {
      voidedReason = s.voidReason();
      await event('voided', users.gc, { status: 'open' }, { status: 'voided' }, voidedReason, later(VERDICT_HOURS));
      status = 'voided';
      version += 1;
    }
    if (s.comment && status !== 'voided') {
      await event('comment', subUser, null, {}, WAIT_COMMENTS[sub], later(VERDICT_HOURS));
    }
    await finding.update({ status, returnCount: returns, voidedReason, version }, { transaction });
  }
}
