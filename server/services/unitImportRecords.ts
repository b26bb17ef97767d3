/**
 * The record of committed unit imports, their undo, the job's kept kind mapping, and the rule
 * undo and bulk delete share: a unit with a check or a finding is evidence and stays.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { UnitImportRecordDto } from '../../shared/schemas/setup';
import { UNIT_KIND_KEYS, type UnitKindKey } from '../../shared/words';
import { conflict, notFound } from '../errors';
import { Level, Space, Unit } from '../models';

export interface ImportChange {
  unitId: string;
  action: 'added' | 'changed' | 'removed';
  /** changed: the fields as they were; removed: the whole unit as it was. */
  before: Record<string, unknown> | null;
  versionAfter: number | null;
}

function db() {
  return Unit.sequelize!;
}

/** The job's kind mapping kept from earlier imports: normalised value → kind. */
export async function savedKindValues(jobId: string, transaction: Transaction): Promise<Map<string, UnitKindKey>> {
  const rows = await db().query<{ value: string; kind: string }>(`SELECT value, kind FROM unit_kind_mappings WHERE job_id = $1`, {
    bind: [jobId],
    type: QueryTypes.SELECT,
    transaction,
  });
  const known = new Set<string>(UNIT_KIND_KEYS);
  return new Map(rows.filter((r) => known.has(r.kind)).map((r) => [r.value, r.kind as UnitKindKey]));
}

export async function saveKindValues(jobId: string, values: Array<{ value: string; kind: UnitKindKey }>, transaction: Transaction): Promise<void> {
  for (const { value, kind } of values) {
    await db().query(
      `INSERT INTO unit_kind_mappings (job_id, value, kind, updated_at) VALUES ($1, $2, $3, now())
       ON CONFLICT (job_id, value) DO UPDATE SET kind = EXCLUDED.kind, updated_at = now()`,
      { bind: [jobId, value, kind], transaction },
    );
  }
}

/** Of these units, those with a unit check or a finding. */
export async function unitIdsInUse(unitIds: string[], transaction: Transaction): Promise<Set<string>> {
  if (unitIds.length === 0) return new Set();
  const rows = await db().query<{ id: string }>(
    `SELECT u.id FROM unnest($1::uuid[]) AS u(id)
     WHERE EXISTS (SELECT 1 FROM unit_checks c WHERE c.unit_id = u.id) OR EXISTS (SELECT 1 FROM findings f WHERE f.unit_id = u.id)`,
    { bind: [unitIds], type: QueryTypes.SELECT, transaction },
  );
  return new Set(rows.map((r) => r.id));
}

/** "IU-1, IU-2 and 3 more" */
export function tagList(tags: string[]): string {
  const sorted = [...tags].sort((a, b) => a.localeCompare(b));
  if (sorted.length <= 3) return sorted.length <= 1 ? (sorted[0] ?? '') : `${sorted.slice(0, -1).join(', ')} and ${sorted[sorted.length - 1]}`;
  return `${sorted.slice(0, 3).join(', ')} and ${sorted.length - 3} more`;
}

export async function recordImport(
  transaction: Transaction,
  rec: { jobId: string; actorId: string; fileName: string | null; createdLevelIds: string[]; createdSpaceIds: string[]; changes: ImportChange[] },
): Promise<string> {
  const id = randomUUID();
  const count = (a: ImportChange['action']) => rec.changes.filter((c) => c.action === a).length;
  await db().query(
    `INSERT INTO unit_imports (id, job_id, created_by, file_name, added, changed, removed, created_level_ids, created_space_ids, created_at)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8::uuid[], $9::uuid[], now())`,
    { bind: [id, rec.jobId, rec.actorId, rec.fileName, count('added'), count('changed'), count('removed'), rec.createdLevelIds, rec.createdSpaceIds], transaction },
  );
  if (rec.changes.length > 0) {
    await db().query(
      `INSERT INTO unit_import_changes (import_id, unit_id, action, before, version_after)
       SELECT $1, c.unit_id, c.action, c.before, c.version_after
       FROM jsonb_to_recordset($2::jsonb) AS c(unit_id uuid, action text, before jsonb, version_after int)`,
      {
        bind: [id, JSON.stringify(rec.changes.map((c) => ({ unit_id: c.unitId, action: c.action, before: c.before, version_after: c.versionAfter })))],
        transaction,
      },
    );
  }
  return id;
}

interface ImportRow {
  id: string;
  created_at: Date;
  created_by_name: string | null;
  file_name: string | null;
  added: number;
  changed: number;
  removed: number;
  created_level_ids: string[];
  created_space_ids: string[];
  undone_at: Date | null;
}

interface ChangeRow {
  unit_id: string;
  action: ImportChange['action'];
  before: Record<string, unknown> | null;
  version_after: number | null;
  tag: string | null;
  version: number | null;
  in_use: boolean;
}

async function changesOf(importId: string, transaction?: Transaction): Promise<ChangeRow[]> {
  return db().query<ChangeRow>(
    `SELECT c.unit_id, c.action, c.before, c.version_after, u.tag, u.version,
       (EXISTS (SELECT 1 FROM unit_checks k WHERE k.unit_id = c.unit_id) OR EXISTS (SELECT 1 FROM findings f WHERE f.unit_id = c.unit_id)) AS in_use
     FROM unit_import_changes c LEFT JOIN units u ON u.id = c.unit_id
     WHERE c.import_id = $1`,
    { bind: [importId], type: QueryTypes.SELECT, transaction },
  );
}

/**
 * Why an undo would be refused now (null: it would be accepted). `laterTags`: units of this import
 * that a later import, not undone, changed or removed: that one must be undone first.
 */
function undoRefusal(row: ImportRow, laterTags: string[], changes: ChangeRow[]): { id: string; message: string } | null {
  if (row.undone_at) return { id: 'import_undone', message: 'This import was already undone.' };
  if (laterTags.length > 0) {
    return { id: 'import_not_latest', message: `A later import changed ${tagList(laterTags)} since: undo the later import first.` };
  }
  const kept = changes.filter((c) => c.action !== 'removed');
  const used = kept.filter((c) => c.in_use && c.tag !== null).map((c) => c.tag!);
  if (used.length > 0) {
    return {
      id: 'import_units_in_use',
      message: `${tagList(used)} ${used.length === 1 ? 'has' : 'have'} a unit check or a finding now: an import is undone only while none of its units has one.`,
    };
  }
  const edited = kept.filter((c) => c.tag !== null && c.version !== c.version_after).map((c) => c.tag!);
  if (edited.length > 0) {
    return { id: 'import_units_changed', message: `${tagList(edited)} ${edited.length === 1 ? 'was' : 'were'} changed after the import: undoing it would lose that change.` };
  }
  const gone = kept.filter((c) => c.tag === null).length;
  if (gone > 0) return { id: 'import_units_changed', message: `${gone} unit${gone === 1 ? ' of this import was' : 's of this import were'} deleted since.` };
  return null;
}

async function importRows(jobId: string, where: string, bind: unknown[], transaction?: Transaction, lock = false): Promise<ImportRow[]> {
  return db().query<ImportRow>(
    `SELECT i.id, i.created_at, us.name AS created_by_name, i.file_name, i.added, i.changed, i.removed, i.created_level_ids, i.created_space_ids, i.undone_at
     FROM unit_imports i LEFT JOIN users us ON us.id = i.created_by
     WHERE i.job_id = $1 ${where} ORDER BY i.created_at DESC, i.id DESC ${lock ? 'FOR UPDATE OF i' : ''}`,
    { bind: [jobId, ...bind], type: QueryTypes.SELECT, transaction },
  );
}

/** Tags of this import's units that a later import, not undone, changed or removed. */
async function touchedLater(jobId: string, row: ImportRow, transaction?: Transaction): Promise<string[]> {
  const rows = await db().query<{ tag: string }>(
    `SELECT DISTINCT coalesce(u.tag, lc.before->>'tag', '?') AS tag
     FROM unit_import_changes c
     JOIN unit_import_changes lc ON lc.unit_id = c.unit_id AND lc.import_id <> c.import_id AND lc.action IN ('changed', 'removed')
     JOIN unit_imports ci ON ci.id = c.import_id
     JOIN unit_imports li ON li.id = lc.import_id AND li.job_id = $1 AND li.undone_at IS NULL
       AND (li.created_at, li.id) > (ci.created_at, ci.id)
     LEFT JOIN units u ON u.id = c.unit_id
     WHERE c.import_id = $2`,
    { bind: [jobId, row.id], type: QueryTypes.SELECT, transaction },
  );
  return rows.map((r) => r.tag);
}

/** The job's last 20 imports, newest first, each saying whether it can be undone now. */
export async function listImports(jobId: string): Promise<UnitImportRecordDto[]> {
  const rows = (await importRows(jobId, '', [])).slice(0, 20);
  const out: UnitImportRecordDto[] = [];
  for (const row of rows) {
    const refusal = row.undone_at ? undoRefusal(row, [], []) : undoRefusal(row, await touchedLater(jobId, row), await changesOf(row.id));
    out.push({
      id: row.id,
      createdAt: new Date(row.created_at).toISOString(),
      createdByName: row.created_by_name,
      fileName: row.file_name,
      added: row.added,
      changed: row.changed,
      removed: row.removed,
      levelsCreated: row.created_level_ids.length,
      spacesCreated: row.created_space_ids.length,
      undoneAt: row.undone_at ? new Date(row.undone_at).toISOString() : null,
      undo: refusal ? { possible: false, reason: refusal.message } : { possible: true },
    });
  }
  return out;
}

/**
 * Undoes an import (one no later import built on): added units deleted, changed units given their fields back,
 * removed units put back, and the levels and spaces it created deleted when nothing else uses
 * them. 409 with the reason while any of its units has a check or a finding or was changed since.
 */
export async function undoImport(ctx: { jobId: string; actorId: string; transaction: Transaction }, importId: string): Promise<{ restored: number; deleted: number }> {
  const { jobId, transaction } = ctx;
  // One undo or import of a job at a time: the job row is the lock the level writes use too.
  await db().query(`SELECT id FROM jobs WHERE id = $1 FOR UPDATE`, { bind: [jobId], transaction });
  const [row] = await importRows(jobId, 'AND i.id = $2', [importId], transaction, true);
  if (!row) throw notFound('Import not found.');
  const changes = await changesOf(importId, transaction);
  const refusal = undoRefusal(row, await touchedLater(jobId, row, transaction), changes);
  if (refusal) throw conflict(refusal.message, refusal.id);

  let restored = 0;
  let deleted = 0;
  /**
   * A unit given back its state from before this import takes a new version (never an old one
   * again: a screen holding it would match a different state later), and the earlier import that
   * left it in that state records the new version, so that import can still be undone in turn.
   */
  const carryVersion = async (unitId: string, from: unknown, to: number) => {
    await db().query(`UPDATE unit_import_changes SET version_after = $3 WHERE unit_id = $1 AND version_after = $2 AND import_id <> $4`, {
      bind: [unitId, Number(from), to, importId],
      transaction,
    });
  };
  for (const c of changes) {
    if (c.action === 'added') {
      await Unit.destroy({ where: { id: c.unit_id, jobId }, transaction });
      deleted += 1;
    } else if (c.action === 'changed') {
      const { version: previous, ...fields } = c.before ?? {};
      const next = (c.version ?? 0) + 1;
      await Unit.update({ ...fields, version: next }, { where: { id: c.unit_id, jobId }, transaction });
      await carryVersion(c.unit_id, previous, next);
      restored += 1;
    }
  }
  for (const c of changes.filter((x) => x.action === 'removed')) {
    const before = c.before as Record<string, unknown>;
    if (await Unit.findOne({ where: { jobId, tag: before.tag as string }, attributes: ['id'], transaction })) {
      throw conflict(`Tag "${String(before.tag)}" is used by another unit now, so the unit this import removed cannot be put back.`, 'import_units_changed');
    }
    const next = Number(before.version ?? 1) + 1;
    await Unit.create({ ...(before as object), version: next } as never, { transaction });
    await carryVersion(c.unit_id, before.version, next);
    restored += 1;
  }
  // Places the import created, unless something uses them now.
  if (row.created_space_ids.length > 0) {
    await db().query(
      `DELETE FROM spaces s WHERE s.id = ANY($1::uuid[]) AND s.job_id = $2
         AND NOT EXISTS (SELECT 1 FROM units u WHERE u.space_id = s.id)`,
      { bind: [row.created_space_ids, jobId], transaction },
    );
  }
  if (row.created_level_ids.length > 0) {
    const unused = await Level.findAll({ where: { id: row.created_level_ids, jobId }, transaction });
    for (const level of unused.sort((a, b) => b.position - a.position)) {
      const [spaces, units] = await Promise.all([Space.count({ where: { levelId: level.id }, transaction }), Unit.count({ where: { levelId: level.id }, transaction })]);
      if (spaces > 0 || units > 0 || level.planKey) continue;
      await level.destroy({ transaction });
      await db().query(`UPDATE levels SET position = position - 1, version = version + 1, updated_at = now() WHERE job_id = $1 AND position > $2`, {
        bind: [jobId, level.position],
        transaction,
      });
    }
  }
  await db().query(`UPDATE unit_imports SET undone_at = now(), undone_by = $2 WHERE id = $1`, { bind: [importId, ctx.actorId], transaction });
  return { restored, deleted };
}
