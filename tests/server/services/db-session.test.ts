/**
 * What every connection of the app is set up with (server/db.ts), and the partial indexes the
 * fixes-waiting figure of the levels board and the scorecards reads (migration 20261205000000).
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { sessionOptions, type Database } from '../../../server/db';
import { WAITING_FIXES_SQL } from '../../../server/services/board/common';
import { connectOwnDb } from '../../support/db';

// A database of its own, empty: the planner's choice between indexes that could all serve the
// query then depends on nothing other test files write at the same time.
let db: Database;
let drop: () => Promise<void>;
beforeAll(async () => {
  ({ db, drop } = await connectOwnDb('db_session'));
});
afterAll(async () => {
  await drop();
});

describe('connection settings', () => {
  it('turns JIT compilation off on the app connections', async () => {
    const [row] = await db.sequelize.query<{ jit: string }>('SHOW jit', { type: QueryTypes.SELECT });
    expect(row!.jit).toBe('off');
  });

  it('keeps settings the environment gives (PGOPTIONS) and adds its own after them', () => {
    expect(sessionOptions({})).toBe('-c jit=off');
    expect(sessionOptions({ PGOPTIONS: ' -c statement_timeout=5000 ' })).toBe('-c statement_timeout=5000 -c jit=off');
  });
});

describe('fixes waiting for the inspector', () => {
  it('are read through the two partial indexes (their predicates match the query)', async () => {
    // With scans of the tables ruled out, the plan can only use an index whose predicate the
    // query implies: a change of the query's status or event kind would leave these unused.
    const plan = await db.sequelize.transaction(async (transaction) => {
      await db.sequelize.query('SET LOCAL enable_seqscan = off', { transaction });
      await db.sequelize.query('SET LOCAL enable_bitmapscan = off', { transaction });
      const rows = await db.sequelize.query<{ 'QUERY PLAN': string }>(`EXPLAIN ${WAITING_FIXES_SQL}`, {
        bind: [randomUUID()],
        type: QueryTypes.SELECT,
        transaction,
      });
      return rows.map((r) => r['QUERY PLAN']).join('\n');
    });
    expect({ plan }).toEqual({ plan: expect.stringMatching(/Index (Only )?Scan using findings_job_fix_submitted on findings/) });
    expect({ plan }).toEqual({ plan: expect.stringMatching(/Index (Only )?Scan Backward using finding_events_fix_submitted_at on finding_events/) });
  });
});
