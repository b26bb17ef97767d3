/**
 * One change to one finding (PATCH): each kind of change is a named step, and a bulk change
 * (bulkChangeFindings.ts) runs the same steps over many findings.
 *
 *   reassign   another company on the job (event; a critical finding mails the new company)
 *   severity   another severity (event)
 *   dueOn      another due date (event)
 *   void       open | fix submitted → voided, with a reason (event)
 *   reopen     closed → open, with a reason (event)
 *   close      open → closed on a walk, with an optional note (event)
 *   pin        where the finding is drawn on its level's plan, or no pin; no event (it is not part
 *              of the finding's history); any status but voided (shared/findingStatus.ts decidePin)
 *
 * Who may do what from which status: shared/findingStatus.ts. Every step raises the version.
 */
import type { z } from 'zod';
import { decide, decidePin, type Decision } from '../../shared/findingStatus';
import type { FindingAction, FindingDetail, findingChangeSchema } from '../../shared/schemas/findings';
import type { FindingStatus } from '../../shared/words';
import { badRequest, type HttpError } from '../errors';
import type { Finding } from '../models';
import { checkDueOn } from '../services/dueOn';
import { companyOnJob, recordFindingEvent, type CompanyRef } from '../services/findings';
import { notifyCriticalAssignment, type Actor, type CommandContext } from './context';
import { authorise, detailOf, lockFinding, saveChange, type Precondition } from './findingWrites';

export type FindingChange = z.infer<typeof findingChangeSchema>;
export type ChangeKind = keyof FindingChange;

/**
 * One kind of change. `field` is where the change sits in the request body ("reassign" in a
 * PATCH, "change.reassign" in a bulk change), so a 400 names the field the caller sent.
 */
export interface ChangeStep<Input, Ready> {
  /** The status machine's answer for this actor and this finding. */
  decide(finding: Finding, actor: Actor): Decision;
  /** Reads and checks what the change needs, once (a bulk change: once for all its findings). */
  prepare(ctx: CommandContext, input: Input, field: string): Promise<Ready>;
  /**
   * Makes the change on the locked finding (saved by the caller) and records its event; `to` is
   * the status after. False when the finding already is as asked: nothing was recorded.
   */
  apply(ctx: CommandContext, finding: Finding, ready: Ready, to: FindingStatus): Promise<boolean>;
  /** The 400 of a single change that would change nothing. */
  unchanged?(finding: Finding, field: string): HttpError;
  /** After the finding is saved (mails). */
  after?(ctx: CommandContext, finding: Finding): Promise<void>;
}

function byAction(action: FindingAction) {
  return (finding: Finding, actor: Actor) => decide(finding.status, action, actor.role, finding.loggedBy === actor.id);
}

function event(ctx: CommandContext, finding: Finding, kind: Parameters<typeof recordFindingEvent>[0]['kind'], from: Record<string, unknown>, to: Record<string, unknown>, reason: string | null | undefined) {
  return recordFindingEvent({ findingId: finding.id, jobId: finding.jobId, actorId: ctx.actor.id, kind, from, to, reason: reason || null }, ctx.transaction);
}

function fieldError(field: string, message: string, short: string): HttpError {
  return badRequest(`${field}: ${message}`, { [field]: short });
}

type ReassignInput = NonNullable<FindingChange['reassign']>;

export const reassignStep: ChangeStep<ReassignInput, { company: CompanyRef; reason: string }> = {
  decide: byAction('reassign'),
  async prepare(ctx, input, field) {
    const company = await companyOnJob(ctx.sequelize, ctx.scope.jobId, input.companyId, ctx.transaction);
    if (!company) throw fieldError(`${field}.companyId`, 'That company is not on this job.', 'That company is not on this job.');
    return { company, reason: input.reason };
  },
  async apply(ctx, finding, { company, reason }) {
    if (company.id === finding.companyId) return false;
    const previous = await companyOnJob(ctx.sequelize, finding.jobId, finding.companyId, ctx.transaction);
    await event(ctx, finding, 'reassigned', { companyId: finding.companyId, companyName: previous?.name ?? null }, { companyId: company.id, companyName: company.name }, reason);
    finding.companyId = company.id;
    return true;
  },
  unchanged: (_finding, field) => fieldError(`${field}.companyId`, 'The finding is already assigned to that company.', 'Already assigned to that company.'),
  after: (ctx, finding) =>
    notifyCriticalAssignment(ctx, { jobId: finding.jobId, findingId: finding.id, companyId: finding.companyId, severity: finding.severity, how: 'reassigned' }),
};

/**
 * A change that sets one field of the finding to `to` (severity, due date), with an event that
 * holds the value before and after, and the reason given.
 */
function settingStep<K extends 'severity' | 'dueOn'>(
  key: K,
  action: FindingAction,
  eventType: 'severity_changed' | 'due_changed',
  already: (finding: Finding) => string,
  alreadyShort: string,
): ChangeStep<NonNullable<FindingChange[K]>, NonNullable<FindingChange[K]>> {
  return {
    decide: byAction(action),
    prepare: async (_ctx, input) => input,
    async apply(ctx, finding, input) {
      if (input.to === finding[key]) return false;
      await event(ctx, finding, eventType, { [key]: finding[key] }, { [key]: input.to }, input.reason);
      finding.set(key, input.to as Finding[K]);
      return true;
    },
    unchanged: (finding, field) => fieldError(`${field}.to`, already(finding), alreadyShort),
  };
}

export const severityStep = settingStep('severity', 'change_severity', 'severity_changed', (f) => `The severity is already ${f.severity}.`, 'That is the severity already.');

const dueOnSetting = settingStep('dueOn', 'change_due', 'due_changed', (f) => `The finding is already due on ${f.dueOn}.`, 'That is the due date already.');

type DueOnInput = NonNullable<FindingChange['dueOn']>;

/**
 * Another due date: a date before today on the job's clock is refused unless a GC manager
 * back-dates it on purpose (services/dueOn.ts); a back-dated change says so in its event.
 */
export const dueOnStep: ChangeStep<DueOnInput, DueOnInput & { past: boolean }> = {
  ...dueOnSetting,
  async prepare(ctx, input, field) {
    const { backdated } = checkDueOn(`${field}.to`, { dueOn: input.to, backdated: input.backdated }, ctx.actor.role, ctx.scope.timeZone, ctx.clock());
    return { ...input, past: backdated };
  },
  async apply(ctx, finding, input) {
    if (input.to === finding.dueOn) return false;
    await event(ctx, finding, 'due_changed', { dueOn: finding.dueOn }, { dueOn: input.to, ...(input.past ? { backdated: true } : {}) }, input.reason);
    finding.dueOn = input.to;
    return true;
  },
};

/**
 * A move of the status machine with an event and the words given: voiding and reopening take a
 * reason, closing on a walk an optional note. `also` sets what the move keeps beside the status.
 */
function moveStep<K extends 'void' | 'reopen' | 'close'>(
  action: FindingAction,
  eventType: 'voided' | 'reopened' | 'closed_on_walk',
  words: (input: NonNullable<FindingChange[K]>) => string | null | undefined,
  also?: (finding: Finding, input: NonNullable<FindingChange[K]>) => void,
): ChangeStep<NonNullable<FindingChange[K]>, NonNullable<FindingChange[K]>> {
  return {
    decide: byAction(action),
    prepare: async (_ctx, input) => input,
    async apply(ctx, finding, input, to) {
      await event(ctx, finding, eventType, { status: finding.status }, { status: to }, words(input));
      finding.status = to;
      also?.(finding, input);
      return true;
    },
  };
}

export const voidStep = moveStep<'void'>('void', 'voided', (input) => input.reason, (finding, input) => {
  finding.voidedReason = input.reason;
});

export const reopenStep = moveStep<'reopen'>('reopen', 'reopened', (input) => input.reason);

export const closeStep = moveStep<'close'>('close', 'closed_on_walk', (input) => input.note || null);

type PinInput = FindingChange['pin'];

export const pinStep: ChangeStep<PinInput, PinInput> = {
  decide: (finding, actor) => decidePin(finding.status, actor.role),
  prepare: async (_ctx, input) => input,
  async apply(_ctx, finding, input) {
    finding.pinX = input?.x ?? null;
    finding.pinY = input?.y ?? null;
    return true;
  },
};

/** The step of each kind of change (the PATCH body's key). */
export const CHANGE_STEPS: Record<ChangeKind, ChangeStep<unknown, unknown>> = {
  reassign: reassignStep,
  severity: severityStep,
  dueOn: dueOnStep,
  void: voidStep,
  reopen: reopenStep,
  close: closeStep,
  pin: pinStep,
};

/** The one change a body holds (the schema allows exactly one; `pin: null` counts). */
export function changeKindOf(change: Partial<Record<ChangeKind, unknown>>): ChangeKind {
  const kind = (Object.keys(CHANGE_STEPS) as ChangeKind[]).find((k) => change[k] !== undefined);
  if (!kind) throw badRequest('change: Send exactly one change: reassign, severity, dueOn, void, reopen, close or pin.', { change: 'Send exactly one change.' });
  return kind;
}

/** Runs one step on one locked finding: authorise (403 → If-Match → 409), prepare, apply, save, after. */
export async function runStep<I, R>(ctx: CommandContext, finding: Finding, step: ChangeStep<I, R>, input: I, field: string, pre: Precondition): Promise<void> {
  const to = await authorise(ctx, finding, step.decide(finding, ctx.actor), pre);
  const ready = await step.prepare(ctx, input, field);
  const changed = await step.apply(ctx, finding, ready, to);
  if (!changed) throw step.unchanged ? step.unchanged(finding, field) : badRequest(`${field}: Nothing to change.`);
  await saveChange(ctx, finding);
  await step.after?.(ctx, finding);
}

export async function changeFinding(ctx: CommandContext, findingId: string, change: FindingChange, pre: Precondition): Promise<FindingDetail> {
  const finding = await lockFinding(ctx, findingId);
  const kind = changeKindOf(change);
  await runStep(ctx, finding, CHANGE_STEPS[kind], change[kind], kind, pre);
  return detailOf(ctx, finding.id);
}
