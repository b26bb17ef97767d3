/** Small helpers shared by the job set-up routes: transactions, row locks, If-Match, 409 on references. */
import type { Request } from 'express';
import { col, fn, ForeignKeyConstraintError, Op, where, type Model, type ModelStatic, type Sequelize, type Transaction, type WhereOptions } from 'sequelize';
import { conflict, notFound } from '../errors';
import { Job } from '../models';
import { checkVersion, versionMatches } from './versioning';

export function sequelizeOf(req: Request): Sequelize {
  return req.app.get('sequelize') as Sequelize;
}

export function inTransaction<T>(req: Request, work: (transaction: Transaction) => Promise<T>): Promise<T> {
  return sequelizeOf(req).transaction(work);
}

/** SELECT ... FOR UPDATE one row of the job, or 404 with `message`. */
export async function lockRow<M extends Model>(
  model: ModelStatic<M>,
  where: WhereOptions,
  transaction: Transaction,
  message: string,
): Promise<M> {
  const row = await model.findOne({ where, transaction, lock: transaction.LOCK.UPDATE });
  if (!row) throw notFound(message);
  return row;
}

/**
 * What a set-up write needs, without the request: the transaction, the job, and the client's
 * If-Match (PATCH and DELETE of versioned records).
 */
export interface SetupWrite {
  transaction: Transaction;
  jobId: string;
  ifMatch?: string;
}

/** The If-Match and the job of a request, for the services that take a SetupWrite. */
export function setupWrite(req: Request, transaction: Transaction): SetupWrite {
  return { transaction, jobId: req.membership!.job.id, ifMatch: req.get('if-match') };
}

/**
 * Locks a versioned row, checks the client's If-Match against it (428 / 412 with the current
 * record, presented), and returns it.
 */
export async function lockForChange<M extends Model & { version: number }>(
  req: Request,
  model: ModelStatic<M>,
  where: WhereOptions,
  transaction: Transaction,
  message: string,
  present: (row: M) => Promise<unknown> | unknown,
): Promise<M> {
  return lockVersioned(model, where, transaction, message, req.get('if-match'), present);
}

/** lockForChange for a service or command that holds the If-Match value, not the request. */
export async function lockVersioned<M extends Model & { version: number }>(
  model: ModelStatic<M>,
  where: WhereOptions,
  transaction: Transaction,
  message: string,
  ifMatch: string | undefined,
  present: (row: M) => Promise<unknown> | unknown,
): Promise<M> {
  const row = await lockRow(model, where, transaction, message);
  if (!ifMatch) checkVersion(ifMatch, row.version); // 428
  else if (!versionMatches(ifMatch, row.version)) checkVersion(ifMatch, row.version, await present(row)); // 412
  return row;
}

/** 409 naming what still refers to a record: "Level 3 still has 4 spaces and 12 units." */
export function refuseIfReferenced(what: string, references: Array<[count: number, singular: string, plural: string]>, advice: string): void {
  const parts = references.filter(([n]) => n > 0).map(([n, one, many]) => `${n} ${n === 1 ? one : many}`);
  if (parts.length === 0) return;
  const list = parts.length === 1 ? parts[0] : `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}`;
  throw conflict(`${what} still has ${list}. ${advice}`, 'referenced');
}

/** Escapes % and _ for a LIKE pattern. */
export function likeContains(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** WHERE lower(column) = lower(value), to combine with other conditions. */
export function lowerEquals(column: string, value: string): WhereOptions {
  return { [Op.and]: [where(fn('lower', col(column)), value.toLowerCase())] };
}

/** Serialises set-up writes of one job that must see each other (positions, name checks). */
export async function lockJob(jobId: string, transaction: Transaction): Promise<void> {
  await Job.sequelize!.query(`SELECT id FROM jobs WHERE id = $1 FOR UPDATE`, { bind: [jobId], transaction });
}

/**
 * Destroys a row; a foreign key from a record this module does not know about (a finding,
 * a walk) turns into a 409 instead of a 500, and nothing is lost.
 */
export async function destroyOrConflict(row: Model, transaction: Transaction, what: string): Promise<void> {
  try {
    await row.destroy({ transaction });
  } catch (err) {
    if (err instanceof ForeignKeyConstraintError) {
      throw conflict(`${what} is still referred to by other records (for example findings), so it cannot be deleted.`, 'referenced');
    }
    throw err;
  }
}
