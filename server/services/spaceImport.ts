/**
 * A room schedule into the job's levels and spaces (POST /spaces/import): each row names a level
 * and a room, and may give its floor area and ceiling height. Levels the job lacks are appended
 * after its levels in file order; a room the level has (same name, case and outer spaces aside)
 * gets the area and height the file gives, the others are created. The preview and the write are
 * worked out by the same plan, read in the write's transaction, so what the preview shows is what
 * apply does; apply is all or none, refused with every line's problem.
 */
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { parseQuantity } from '../../shared/calc/quantity';
import type { QuantityKind } from '../../shared/catalogue/types';
import type { SpaceImportInput, SpaceImportProblem, SpaceImportReport } from '../../shared/schemas/setup';
import { badRequest, conflict } from '../errors';
import { Level, Space } from '../models';
import { lockJob, type SetupWrite } from './records';

/** The same limits as a level or space typed one at a time (createLevelSchema, createSpaceSchema). */
const LEVEL_NAME_MAX = 80;
const SPACE_NAME_MAX = 120;

const keyOf = (name: string) => name.trim().toLowerCase();

/** Equal to within rounding: a file re-exported in other units must not read as a change. */
function same(a: number | null, b: number): boolean {
  return a !== null && Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(a), Math.abs(b));
}

interface Planned {
  report: SpaceImportReport;
  /** New level key → its name as first spelled in the file. */
  levelsToCreate: Map<string, string>;
  spacesToCreate: Array<{ levelKey: string; name: string; floorArea: number | null; ceilingHeight: number | null }>;
  spacesToChange: Array<{ space: Space; floorArea?: number; ceilingHeight?: number }>;
}

type Row = SpaceImportInput['rows'][number];

function plan(rows: Row[], levels: Level[], spaces: Space[], applied: boolean): Planned {
  const levelByKey = new Map(levels.map((l) => [keyOf(l.name), l]));
  const spaceByKey = new Map(spaces.map((s) => [`${s.levelId}\u0000${keyOf(s.name)}`, s]));
  const report: SpaceImportReport = { applied, newLevels: [], created: [], changed: [], unchanged: [], problems: [] };
  const levelsToCreate = new Map<string, string>();
  const seen = new Map<string, number>();
  const spacesToCreate: Planned['spacesToCreate'] = [];
  const spacesToChange: Planned['spacesToChange'] = [];

  rows.forEach((r, row) => {
    const line = r.line ?? null;
    const problems: SpaceImportProblem[] = [];
    const problem = (field: string, message: string) => problems.push({ row, line, field: `rows.${row}.${field}`, message });
    const levelName = r.level.trim();
    const spaceName = r.space.trim();
    if (levelName === '') problem('level', 'Give the level.');
    else if (levelName.length > LEVEL_NAME_MAX) problem('level', `A level name is at most ${LEVEL_NAME_MAX} characters.`);
    if (spaceName === '') problem('space', 'Give the room number or name.');
    else if (spaceName.length > SPACE_NAME_MAX) problem('space', `A space name is at most ${SPACE_NAME_MAX} characters.`);
    const quantity = (text: string | undefined, kind: QuantityKind, field: string, label: string): number | undefined => {
      if (text === undefined || text.trim() === '') return undefined;
      const parsed = parseQuantity(text, kind);
      if (!parsed.ok) problem(field, parsed.error);
      else if (!(parsed.value > 0)) problem(field, `${label} must be more than zero.`);
      else return parsed.value;
      return undefined;
    };
    const floorArea = quantity(r.area, 'area', 'area', 'Floor area');
    const ceilingHeight = quantity(r.height, 'length', 'height', 'Ceiling height');

    const levelKey = keyOf(levelName);
    const spaceKey = `${levelKey}\u0000${keyOf(spaceName)}`;
    if (levelName !== '' && spaceName !== '') {
      const first = seen.get(spaceKey);
      if (first !== undefined) {
        const where = rows[first]!.line ? `line ${rows[first]!.line}` : `row ${first + 1}`;
        problem('space', `"${spaceName}" on ${levelName} is also on ${where}.`);
      } else seen.set(spaceKey, row);
    }
    if (problems.length > 0) {
      report.problems.push(...problems);
      return;
    }

    const level = levelByKey.get(levelKey);
    const room = { row, line, level: level?.name ?? levelsToCreate.get(levelKey) ?? levelName, space: spaceName };
    const existing = level ? spaceByKey.get(`${level.id}\u0000${keyOf(spaceName)}`) : undefined;
    if (!level && !levelsToCreate.has(levelKey)) {
      levelsToCreate.set(levelKey, levelName);
      report.newLevels.push(levelName);
    }
    if (!existing) {
      report.created.push({ ...room, newLevel: !level, floorArea: floorArea ?? null, ceilingHeight: ceilingHeight ?? null });
      spacesToCreate.push({ levelKey, name: spaceName, floorArea: floorArea ?? null, ceilingHeight: ceilingHeight ?? null });
      return;
    }
    const change: Planned['spacesToChange'][number] = { space: existing };
    const shown: SpaceImportReport['changed'][number] = { ...room, space: existing.name, spaceId: existing.id };
    if (floorArea !== undefined && !same(existing.floorArea, floorArea)) {
      change.floorArea = floorArea;
      shown.floorArea = { from: existing.floorArea, to: floorArea };
    }
    if (ceilingHeight !== undefined && !same(existing.ceilingHeight, ceilingHeight)) {
      change.ceilingHeight = ceilingHeight;
      shown.ceilingHeight = { from: existing.ceilingHeight, to: ceilingHeight };
    }
    if (shown.floorArea || shown.ceilingHeight) {
      report.changed.push(shown);
      spacesToChange.push(change);
    } else report.unchanged.push({ row, line, level: room.level, space: existing.name, spaceId: existing.id });
  });
  return { report, levelsToCreate, spacesToCreate, spacesToChange };
}

/** "Line 4: Floor area: ..." for the 400's message. */
function problemSentence(p: SpaceImportProblem): string {
  const where = p.line ? `Line ${p.line}` : `Row ${p.row + 1}`;
  return `${where}: ${p.message}`;
}

/**
 * The room schedule's preview (apply false: nothing written) or its write (apply true: all of it
 * in `transaction`, or a 400 whose fields name each line's problem).
 */
export async function importSpaces(write: SetupWrite, input: SpaceImportInput): Promise<SpaceImportReport> {
  const { transaction, jobId } = write;
  // Set-up writes of one job wait for each other here (levels' positions, names per level); a
  // preview writes nothing and holds no one up.
  if (input.apply) await lockJob(jobId, transaction);
  const levels = await Level.findAll({ where: { jobId }, transaction });
  const spaces = await Space.findAll({ where: { jobId }, transaction, ...(input.apply ? { lock: transaction.LOCK.UPDATE } : {}) });
  const planned = plan(input.rows, levels, spaces, input.apply);
  if (!input.apply) return planned.report;

  const { problems } = planned.report;
  if (problems.length > 0) {
    const lines = new Set(problems.map((p) => p.row)).size;
    const fields = Object.fromEntries(problems.map((p) => [p.field, p.message]));
    const shown = problems.slice(0, 3).map(problemSentence).join(' ');
    throw badRequest(
      `${lines} line${lines === 1 ? ' has a problem' : 's have problems'}: nothing was imported. ${shown}${problems.length > 3 ? ' …' : ''}`,
      fields,
    );
  }
  try {
    await applyPlan(write, planned, levels, transaction);
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      throw conflict('A level or space of the file was added meanwhile; nothing was imported. Preview again.', 'duplicate');
    }
    throw err;
  }
  return planned.report;
}

async function applyPlan(write: SetupWrite, planned: Planned, levels: Level[], transaction: Transaction): Promise<void> {
  const { jobId } = write;
  // One statement per kind of write, whatever the file's size: the new levels, the new spaces,
  // the changed spaces. The job is locked (importSpaces), so the positions read with the levels
  // are still the last ones and the new levels go after them in file order.
  const levelIds = new Map(levels.map((l) => [keyOf(l.name), l.id]));
  if (planned.levelsToCreate.size > 0) {
    const last = levels.reduce((max, l) => Math.max(max, l.position), 0);
    const created = await Level.bulkCreate(
      [...planned.levelsToCreate.values()].map((name, i) => ({ jobId, name, position: last + 1 + i })),
      { transaction },
    );
    for (const level of created) levelIds.set(keyOf(level.name), level.id);
  }
  if (planned.spacesToCreate.length > 0) {
    await Space.bulkCreate(
      planned.spacesToCreate.map((s) => ({ jobId, levelId: levelIds.get(s.levelKey)!, name: s.name, floorArea: s.floorArea, ceilingHeight: s.ceilingHeight })),
      { transaction },
    );
  }
  if (planned.spacesToChange.length > 0) {
    // A value the file leaves out travels as NULL and keeps the stored one (an import never clears
    // a size: a given one is more than zero). Version and updated_at move as a single save would.
    const bind: unknown[] = [jobId, new Date()];
    const values = planned.spacesToChange.map(({ space, floorArea, ceilingHeight }) => {
      bind.push(space.id, floorArea ?? null, ceilingHeight ?? null);
      const n = bind.length;
      return `($${n - 2}::uuid, $${n - 1}::double precision, $${n}::double precision)`;
    });
    // Three bound values a row: 2,000 rows stay far below PostgreSQL's 65,535 parameters.
    const updated = await Space.sequelize!.query(
      `UPDATE spaces AS s
          SET floor_area = coalesce(v.floor_area, s.floor_area),
              ceiling_height = coalesce(v.ceiling_height, s.ceiling_height),
              version = s.version + 1,
              updated_at = $2
         FROM (VALUES ${values.join(', ')}) AS v (id, floor_area, ceiling_height)
        WHERE s.id = v.id AND s.job_id = $1`,
      { bind, transaction, type: QueryTypes.BULKUPDATE },
    );
    // The rows were read FOR UPDATE in this transaction, so every one of them is still there.
    if (updated !== planned.spacesToChange.length) throw new Error(`Space import: ${updated} of ${planned.spacesToChange.length} spaces updated.`);
  }
}
