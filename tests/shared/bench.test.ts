/**
 * The benchmark's pure helpers (scripts/lib/bench*.ts): percentiles, the open loop's arrival
 * schedule and its latency from the scheduled time, the target verdicts, how a captured write is
 * replayed, and the server's CPU time read from /proc.
 */
import { cpuTicksFromStat, insertedIds, isTransactionControl, median, replayPlan } from '../../scripts/lib/benchCapacity';
import { percentile, stats } from '../../scripts/lib/benchHttp';
import { arrivalSchedule, latencyVerdicts, openLoop } from '../../scripts/lib/benchOpenLoop';

describe('percentiles', () => {
  it('takes the nearest rank: p50 of 1..10 is 5, p95 and p99 are 10', () => {
    const s = stats([10, 1, 9, 2, 8, 3, 7, 4, 6, 5]);
    expect(s).toEqual({ count: 10, p50: 5, p95: 10, p99: 10, max: 10 });
  });

  it('p95 of 1..100 is 95 and p99 is 99', () => {
    const sorted = Array.from({ length: 100 }, (_, i) => i + 1);
    expect(percentile(sorted, 95)).toBe(95);
    expect(percentile(sorted, 99)).toBe(99);
    expect(percentile(sorted, 0)).toBe(1);
  });

  it('no values: NaN, not 0', () => {
    expect(stats([]).p95).toBeNaN();
    expect(median([])).toBeNaN();
  });

  it('median of an even count is the mean of the middle two', () => {
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([3, 1, 2])).toBe(2);
  });
});

describe('arrival schedule', () => {
  it('is evenly spaced at the rate for the duration', () => {
    const s = arrivalSchedule(60, 2);
    expect(s).toHaveLength(120);
    expect(s[0]).toBe(0);
    expect(s[1]).toBeCloseTo(1000 / 60, 9);
    expect(s[119]).toBeCloseTo((119 * 1000) / 60, 9);
    expect(s[119]).toBeLessThan(2000);
  });

  it('is empty without a rate or a duration', () => {
    expect(arrivalSchedule(0, 10)).toEqual([]);
    expect(arrivalSchedule(10, 0)).toEqual([]);
  });
});

describe('open loop', () => {
  it('sends each arrival at its time without waiting for earlier answers, and counts queueing from the scheduled time', async () => {
    // One "connection" that serves a request in 30 ms, one at a time; arrivals every 10 ms.
    let line = Promise.resolve();
    const started: number[] = [];
    const answeredBefore: number[] = [];
    let answered = 0;
    const result = await openLoop(100, 0.1, (i) => {
      started.push(i);
      answeredBefore.push(answered);
      const served = line.then(() => new Promise<void>((r) => setTimeout(r, 30)));
      line = served;
      return served.then(() => {
        answered += 1;
        return { endpoint: i % 2 ? 'GET odd' : 'GET even', status: i === 3 ? 500 : 200 };
      });
    });
    expect(result.sent).toBe(10);
    expect(started).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    // The tenth went out before the nine before it had all answered (a closed loop waits for them).
    expect(answeredBefore[9]).toBeLessThan(9);
    expect(answered).toBe(10);
    const times = [...result.byEndpoint.values()].flatMap((x) => x.times);
    expect(times).toHaveLength(10);
    // The last arrival (at 90 ms) waits for the nine before it: about 300 ms after the start, so
    // at least 200 ms after its scheduled time (a closed loop would have reported 30 ms).
    expect(Math.max(...times)).toBeGreaterThanOrEqual(200);
    expect(result.byEndpoint.get('GET odd')!.errors).toBe(1);
    expect(result.byEndpoint.get('GET odd')!.sample).toBe('500');
    expect(result.byEndpoint.get('GET even')!.errors).toBe(0);
  });

  it('counts from the scheduled time even when the load generator itself sends late', async () => {
    // The first send holds the event loop for 100 ms while arrivals are due every 10 ms: the next
    // ones go out up to 90 ms late and answer at once, and that delay is part of their latency.
    const result = await openLoop(100, 0.1, (i) => {
      if (i === 0) {
        const until = performance.now() + 100;
        while (performance.now() < until);
      }
      return Promise.resolve({ endpoint: i === 0 ? 'GET board' : 'GET units', status: 200 });
    });
    expect(Math.max(...result.byEndpoint.get('GET units')!.times)).toBeGreaterThanOrEqual(80);
    expect(result.sendLag.max).toBeGreaterThanOrEqual(80);
  });

  it('counts a request without an answer as an error', async () => {
    const result = await openLoop(100, 0.02, () => Promise.reject(Object.assign(new Error('socket hang up'), { endpoint: 'GET units' })));
    expect(result.byEndpoint.get('GET units')).toMatchObject({ errors: 2, sample: 'no answer: socket hang up' });
  });
});

describe('latency verdicts', () => {
  const isBoard = (e: string) => e === 'GET board';
  const hasPhoto = (e: string) => e === 'POST fix (photo)';
  const targets = { readP95: 150, boardP95: 100, photoWriteP95: 600 };

  it('holds every read to 150 ms, the board to 100 ms, fixes with a photo to 600 ms, and no errors', () => {
    const v = latencyVerdicts(
      [
        { endpoint: 'GET findings list', p95: 149, errors: 0 },
        { endpoint: 'GET board', p95: 120, errors: 0 },
        { endpoint: 'POST fix (photo)', p95: 599, errors: 0 },
        { endpoint: 'POST comment', p95: 900, errors: 0 },
      ],
      targets,
      isBoard,
      hasPhoto,
    );
    expect(v.map((x) => [x.what, x.met])).toEqual([
      ['GET findings list p95 < 150 ms', true],
      ['GET board p95 < 150 ms', true],
      ['GET board p95 < 100 ms', false],
      ['POST fix (photo) p95 < 600 ms', true],
      ['no errors', true],
    ]);
  });

  it('one error anywhere is not met', () => {
    const v = latencyVerdicts([{ endpoint: 'POST comment', p95: 10, errors: 1 }], targets, isBoard, hasPhoto);
    expect(v).toEqual([{ what: 'no errors', value: '1', met: false }]);
  });
});

describe('replaying a captured request', () => {
  const jobId = '11111111-1111-4111-8111-111111111111';
  const findingId = '22222222-2222-4222-8222-222222222222';
  const commentId = '33333333-3333-4333-8333-333333333333';

  it('replays a read as it was', () => {
    const plan = replayPlan({ endpoint: 'GET units', write: false, queries: [{ text: 'SELECT 1 WHERE $1::uuid IS NOT NULL', values: [jobId], ms: 1 }] });
    expect(plan.write).toBe(false);
    expect(plan.statements()).toEqual([{ text: 'SELECT 1 WHERE $1::uuid IS NOT NULL', values: [jobId] }]);
  });

  it('leaves out the server transaction, keeps existing ids, and gives created ids and the Idempotency-Key fresh values on each replay', () => {
    const plan = replayPlan({
      endpoint: 'POST comment',
      write: true,
      queries: [
        { text: 'SELECT * FROM idempotency_keys WHERE key = $1', values: ['bench-1-abc-7'], ms: 1 },
        { text: 'START TRANSACTION;', values: undefined, ms: 1 },
        { text: 'SELECT * FROM findings WHERE id = $1 FOR UPDATE', values: [findingId], ms: 1 },
        { text: 'INSERT INTO comments (id, finding_id, job_id) VALUES ($1, $2, $3)', values: [commentId, findingId, jobId], ms: 1 },
        { text: `UPDATE photos SET comment_id = '${commentId}' WHERE finding_id = $1`, values: [findingId], ms: 1 },
        { text: 'SAVEPOINT s1', values: undefined, ms: 1 },
        { text: 'ROLLBACK TO SAVEPOINT s1', values: undefined, ms: 1 },
        { text: 'COMMIT;', values: undefined, ms: 1 },
        { text: 'INSERT INTO idempotency_keys (key, body) VALUES ($1, $2)', values: ['bench-1-abc-7', { type: 'Buffer', data: [1, 2] }], ms: 1 },
      ],
    });
    const a = plan.statements();
    const b = plan.statements();
    expect(a.map((q) => q.text.split(' ')[0])).toEqual(['SELECT', 'SELECT', 'INSERT', 'UPDATE', 'SAVEPOINT', 'ROLLBACK', 'INSERT']);
    const newId = a[2]!.values![0] as string;
    expect(newId).not.toBe(commentId);
    expect(newId).toMatch(/^[0-9a-f-]{36}$/);
    expect(a[2]!.values!.slice(1)).toEqual([findingId, jobId]);
    expect(a[3]!.text).toBe(`UPDATE photos SET comment_id = '${newId}' WHERE finding_id = $1`);
    expect(b[2]!.values![0]).not.toBe(newId);
    expect(a[0]!.values![0]).toMatch(/^bench-1-abc-7-r/);
    expect(a[6]!.values![0]).toBe(a[0]!.values![0]);
    expect(b[0]!.values![0]).not.toBe(a[0]!.values![0]);
    expect(Buffer.isBuffer(a[6]!.values![1])).toBe(true);
  });

  it("finds the new rows' ids in an INSERT, bound or written in the text, and not the ids they refer to", () => {
    expect(insertedIds('INSERT INTO "comments" ("id","finding_id","job_id") VALUES ($1,$2,$3) RETURNING "id"', [commentId, findingId, jobId])).toEqual([commentId]);
    expect(
      insertedIds(`INSERT INTO "photos" ("finding_id","id","note") VALUES ('${findingId}','${commentId}','a, (b)'),('${findingId}','${jobId}'::uuid,'c')`, undefined),
    ).toEqual([commentId, jobId]);
    expect(insertedIds('INSERT INTO unit_events (id, job_id) VALUES (gen_random_uuid(), $1)', [jobId])).toEqual([]);
    expect(insertedIds('INSERT INTO tallies (job_id, n) VALUES ($1, 1)', [jobId])).toEqual([]);
    expect(insertedIds('UPDATE findings SET id = $1', [jobId])).toEqual([]);
  });

  it('knows the server transaction statements from savepoints', () => {
    expect(['START TRANSACTION;', 'BEGIN', 'COMMIT;', 'ROLLBACK;'].every(isTransactionControl)).toBe(true);
    expect(['ROLLBACK TO SAVEPOINT s1', 'SAVEPOINT s1', 'SELECT 1', 'UPDATE findings SET x = 1'].some(isTransactionControl)).toBe(false);
  });
});

describe('server CPU from /proc/<pid>/stat', () => {
  it('adds utime and stime, even when the process name holds spaces and parentheses', () => {
    const stat = '4242 (node (bench) x) S 1 4242 4242 0 -1 4194304 1234 0 0 0 1500 250 0 0 20 0 11 0 123 456 789';
    expect(cpuTicksFromStat(stat)).toBe(1750);
  });

  it('refuses a line that is not one', () => {
    expect(() => cpuTicksFromStat('garbage')).toThrow(/not a \/proc/);
  });
});
