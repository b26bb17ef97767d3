/**
 * The benchmark's large job, seeded in SQL (INSERT ... SELECT over generate_series): 100,000
 * findings on 2,000 units (20 levels x 100 units, 10 spaces and 2 systems per level), 20
 * subcontractor companies by trade, with their history: every finding has its `logged` event;
 * fixes, returns, acceptances, closes on walks, voids and comments follow in proportions like a
 * job in close-out (about 35 % open, 10 % fix submitted, 50 % closed, 5 % voided; 15 % with one
 * return or more). finding_events is append-only: rows are only ever INSERTed here.
 *
 * Everything is invented (names, companies, addresses). Idempotent through BENCH_SEED_VERSION:
 * the job's number carries the version, and a database holding it is reused as it is.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import { hashPassword } from '../../server/auth/passwords';
import type { Database } from '../../server/db';
import { copyBuiltinCatalogue } from '../../server/services/catalogue';
import type { Role } from '../../shared/words';

/** Raise when the shape of the seeded data changes: a cluster with another version is re-seeded. */
export const BENCH_SEED_VERSION = 'BENCH-SEED-3';
export const BENCH_PASSWORD = 'trimout-bench-2026';
export const BENCH_JOB_NAME = 'Bench tower (invented, 100k findings)';

export interface BenchSize {
  findings: number;
  levels: number;
  unitsPerLevel: number;
  spacesPerLevel: number;
  systemsPerLevel: number;
  companies: number;
}

export const BENCH_SIZE: BenchSize = {
  findings: 100_000,
  levels: 20,
  unitsPerLevel: 100,
  spacesPerLevel: 10,
  systemsPerLevel: 2,
  companies: 20,
};

export interface BenchUser {
  id: string;
  email: string;
  role: Role;
  companyId: string;
}

export interface BenchJob {
  jobId: string;
  timeZone: string;
  users: BenchUser[];
  seeded: boolean;
}

/** Trades of the 20 subcontractor companies (the built-in catalogue is mostly mechanical). */
const SUB_TRADES = ['mechanical', 'mechanical', 'electrical', 'mechanical', 'controls', 'ceilings', 'mechanical', 'electrical', 'insulation', 'mechanical'];
const KINDS = ['cassette_4way', 'cassette_4way', 'ducted_low', 'wall_mounted', 'cassette_compact', 'ducted_high', 'floor_console', 'cassette_2way', 'floor_ceiling', 'ahu_coil_kit'];
const USERS_PER_SUB = 2;
const GC_MANAGERS = 4;
const INSPECTORS = 8;
const TIME_ZONE = 'America/Chicago';

async function existing(sequelize: Sequelize): Promise<BenchJob | null> {
  const [job] = await sequelize.query<{ id: string; time_zone: string }>(`SELECT id, time_zone FROM jobs WHERE number = $1`, {
    bind: [BENCH_SEED_VERSION],
    type: QueryTypes.SELECT,
  });
  if (!job) return null;
  const users = await sequelize.query<{ id: string; email: string; role: Role; company_id: string }>(
    `SELECT u.id, u.email, m.role, m.company_id FROM job_members m JOIN users u ON u.id = m.user_id WHERE m.job_id = $1 ORDER BY u.email`,
    { bind: [job.id], type: QueryTypes.SELECT },
  );
  return { jobId: job.id, timeZone: job.time_zone, users: users.map((u) => ({ id: u.id, email: u.email, role: u.role, companyId: u.company_id })), seeded: false };
}

/** Seeds the large job unless this seed version is already there. */
export async function seedBenchJob(db: Database, size: BenchSize = BENCH_SIZE, log: (m: string) => void = () => {}): Promise<BenchJob> {
  const { sequelize } = db;
  const found = await existing(sequelize);
  if (found) return found;
  const passwordHash = await hashPassword(BENCH_PASSWORD);
  const started = Date.now();
  await sequelize.transaction(async (transaction) => {
    const q = (sql: string, bind: unknown[] = []) => sequelize.query(sql, { bind, transaction, raw: true });
    const one = async <T extends object>(sql: string, bind: unknown[] = []) =>
      (await sequelize.query<T>(sql, { bind, transaction, type: QueryTypes.SELECT }))[0]!;

    // Companies and people.
    await q(`CREATE TEMP TABLE b_companies (k int PRIMARY KEY, id uuid NOT NULL, trade text NOT NULL) ON COMMIT DROP`);
    await q(
      `INSERT INTO b_companies (k, id, trade)
       SELECT k, gen_random_uuid(), CASE WHEN k = 0 THEN 'general' WHEN k = -1 THEN 'inspection' ELSE ($1::text[])[((k - 1) % array_length($1::text[], 1)) + 1] END
         FROM generate_series(-1, $2::int) k`,
      [SUB_TRADES, size.companies],
    );
    await q(
      `INSERT INTO companies (id, name, created_at, updated_at)
       SELECT id, CASE WHEN k = 0 THEN 'Bench Builders (invented)' WHEN k = -1 THEN 'Bench Commissioning (invented)'
                       ELSE 'Bench ' || initcap(trade) || ' Co ' || lpad(k::text, 2, '0') || ' (invented)' END, now(), now()
         FROM b_companies`,
    );
    await q(`CREATE TEMP TABLE b_users (id uuid PRIMARY KEY, email text, role text, company_k int, i int) ON COMMIT DROP`);
    await q(
      `INSERT INTO b_users
       SELECT gen_random_uuid(), 'bench.gc' || i || '@bench.trimout.example', 'gc_manager', 0, i FROM generate_series(1, $1::int) i
       UNION ALL
       SELECT gen_random_uuid(), 'bench.inspector' || i || '@bench.trimout.example', 'inspector', -1, i FROM generate_series(1, $2::int) i
       UNION ALL
       SELECT gen_random_uuid(), 'bench.sub' || lpad(k::text, 2, '0') || '.' || i || '@bench.trimout.example', 'subcontractor', k, i
         FROM generate_series(1, $3::int) k CROSS JOIN generate_series(1, $4::int) i`,
      [GC_MANAGERS, INSPECTORS, size.companies, USERS_PER_SUB],
    );
    await q(
      `INSERT INTO users (id, company_id, email, name, password_hash, session_epoch, created_at, updated_at, email_confirmed_at)
       SELECT u.id, c.id, u.email, initcap(replace(u.role, '_', ' ')) || ' ' || u.company_k || '.' || u.i, $1, 0, now(), now(), now()
         FROM b_users u JOIN b_companies c ON c.k = u.company_k`,
      [passwordHash],
    );

    // The job, its companies, members and catalogue.
    const gc = await one<{ id: string }>(`SELECT id FROM b_companies WHERE k = 0`);
    const job = await one<{ id: string }>(
      `INSERT INTO jobs (id, owner_company_id, name, number, address, starts_on, ends_on, time_zone, unit_system, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, $3, '1 Bench Street, Nowhere (invented)', (now() - interval '400 days')::date, (now() + interval '200 days')::date, $4, 'imperial', now(), now())
       RETURNING id`,
      [gc.id, BENCH_JOB_NAME, BENCH_SEED_VERSION, TIME_ZONE],
    );
    const jobId = job.id;
    await q(
      `INSERT INTO job_companies (id, job_id, company_id, trades, created_at, updated_at)
       SELECT gen_random_uuid(), $1, id, ARRAY[CASE WHEN trade = 'inspection' THEN 'general' ELSE trade END]::varchar(20)[], now(), now() FROM b_companies`,
      [jobId],
    );
    await q(
      `INSERT INTO job_members (id, job_id, user_id, role, company_id, created_at, updated_at)
       SELECT gen_random_uuid(), $1, u.id, u.role, c.id, now(), now() FROM b_users u JOIN b_companies c ON c.k = u.company_k`,
      [jobId],
    );
    await copyBuiltinCatalogue(jobId, transaction);
    log(`bench seed: job, ${size.companies} companies, people and catalogue (${Date.now() - started} ms)`);

    // Levels, spaces, systems, units.
    await q(
      `INSERT INTO levels (id, job_id, name, position, created_at, updated_at)
       SELECT gen_random_uuid(), $1, 'Level ' || lpad(p::text, 2, '0'), p, now(), now() FROM generate_series(1, $2::int) p`,
      [jobId, size.levels],
    );
    await q(
      `INSERT INTO spaces (id, job_id, level_id, name, floor_area, ceiling_height, created_at, updated_at)
       SELECT gen_random_uuid(), $1, l.id, 'Suite ' || l.position || lpad(s::text, 2, '0'), 80 + s * 7, 3.0, now(), now()
         FROM levels l CROSS JOIN generate_series(1, $2::int) s WHERE l.job_id = $1`,
      [jobId, size.spacesPerLevel],
    );
    await q(
      `INSERT INTO systems (id, job_id, name, outdoor_model, refrigerant, created_at, updated_at)
       SELECT gen_random_uuid(), $1, 'VRF-' || lpad(l.position::text, 2, '0') || chr(64 + s), 'OU-B10 (invented)', 'R-410A', now(), now()
         FROM levels l CROSS JOIN generate_series(1, $2::int) s WHERE l.job_id = $1`,
      [jobId, size.systemsPerLevel],
    );
    await q(
      `CREATE TEMP TABLE b_units ON COMMIT DROP AS
       SELECT row_number() OVER (ORDER BY l.position, i)::int AS un, gen_random_uuid() AS id, l.id AS level_id, l.position, i,
              ($3::text[])[((i - 1) % array_length($3::text[], 1)) + 1] AS kind,
              (SELECT sp.id FROM spaces sp WHERE sp.level_id = l.id ORDER BY sp.name OFFSET ((i - 1) % $4::int) LIMIT 1) AS space_id,
              (SELECT sy.id FROM systems sy WHERE sy.job_id = $1 AND sy.name = 'VRF-' || lpad(l.position::text, 2, '0') || chr(65 + ((i - 1) % $5::int))) AS system_id
         FROM levels l CROSS JOIN generate_series(1, $2::int) i WHERE l.job_id = $1`,
      [jobId, size.unitsPerLevel, KINDS, size.spacesPerLevel, size.systemsPerLevel],
    );
    await q(`ALTER TABLE b_units ADD PRIMARY KEY (un)`);
    await q(
      `INSERT INTO units (id, job_id, tag, kind, capacity, level_id, space_id, system_id, created_at, updated_at)
       SELECT id, $1, 'L' || lpad(position::text, 2, '0') || '-' || upper(left(kind, 2)) || '-' || lpad(i::text, 3, '0'), kind, 12000, level_id, space_id, system_id, now(), now()
         FROM b_units`,
      [jobId],
    );

    // Walks (5 per level, one every few weeks), and each unit's check on the last walk of its level.
    await q(`CREATE TEMP TABLE b_inspectors ON COMMIT DROP AS SELECT row_number() OVER (ORDER BY email)::int AS k, id FROM b_users WHERE role = 'inspector'`);
    await q(`CREATE TEMP TABLE b_gcs ON COMMIT DROP AS SELECT row_number() OVER (ORDER BY email)::int AS k, id FROM b_users WHERE role = 'gc_manager'`);
    await q(
      `INSERT INTO walks (id, job_id, level_id, inspector_id, started_at, finished_at, created_at, updated_at)
       SELECT gen_random_uuid(), $1, l.id, (SELECT id FROM b_inspectors WHERE k = ((l.position + w) % ${INSPECTORS}) + 1),
              now() - make_interval(days => 200 - w * 35 - l.position), now() - make_interval(days => 200 - w * 35 - l.position) + interval '4 hours', now(), now()
         FROM levels l CROSS JOIN generate_series(1, 5) w WHERE l.job_id = $1`,
      [jobId],
    );
    await q(
      `INSERT INTO unit_checks (id, job_id, unit_id, walk_id, checked_by, checked_at, complete, created_at, updated_at)
       SELECT gen_random_uuid(), $1, u.id, w.id, w.inspector_id, w.started_at + make_interval(mins => u.i), (u.un % 5) <> 0, now(), now()
         FROM b_units u
         JOIN LATERAL (SELECT id, inspector_id, started_at FROM walks WHERE level_id = u.level_id ORDER BY started_at DESC LIMIT 1) w ON true`,
      [jobId],
    );
    log(`bench seed: ${size.levels} levels, ${size.levels * size.unitsPerLevel} units, walks and unit checks (${Date.now() - started} ms)`);

    // Findings: number n on unit ((n - 1) % units) + 1; logged in order over ~175 days up to 5 days ago.
    await q(
      `CREATE TEMP TABLE b_items ON COMMIT DROP AS
       SELECT kind, array_agg(id ORDER BY position, code) AS ids, array_agg(trade ORDER BY position, code) AS trades,
              array_agg(default_severity ORDER BY position, code) AS severities
         FROM catalogue_items, unnest(unit_kinds) kind WHERE job_id = $1 AND retired_at IS NULL GROUP BY kind`,
      [jobId],
    );
    await q(`CREATE TEMP TABLE b_trade_companies ON COMMIT DROP AS SELECT trade, array_agg(id ORDER BY k) AS ids FROM b_companies WHERE k > 0 GROUP BY trade`);
    const units = size.levels * size.unitsPerLevel;
    await q(
      `CREATE TEMP TABLE b_findings ON COMMIT DROP AS
       WITH base AS (
         SELECT n, gen_random_uuid() AS id, u.un, u.id AS unit_id, u.space_id, u.level_id, u.position, u.kind,
                abs(hashint4(n)) % 100 AS r_sev, abs(hashint4(n + 7000001)) % 100 AS r_status,
                abs(hashint4(n + 9000001)) % 100 AS r_ret, abs(hashint4(n + 11000001)) % 100 AS r_misc,
                now() - interval '180 days' + make_interval(secs => n * (175.0 * 86400 / $1::int)) AS logged_at
           FROM generate_series(1, $1::int) n JOIN b_units u ON u.un = ((n - 1) % $2::int) + 1
       ), picked AS (
         SELECT b.*, coalesce(it.ids[(b.n * 7 % array_length(it.ids, 1)) + 1], (SELECT ids[1] FROM b_items LIMIT 1)) AS item_id,
                coalesce(it.trades[(b.n * 7 % array_length(it.ids, 1)) + 1], 'mechanical') AS trade,
                coalesce(it.severities[(b.n * 7 % array_length(it.ids, 1)) + 1], 'minor') AS default_severity
           FROM base b LEFT JOIN b_items it ON it.kind = b.kind
       )
       SELECT p.*,
              CASE WHEN r_sev < 8 THEN 'critical' WHEN r_sev < 40 THEN 'major' WHEN r_sev < 60 THEN p.default_severity ELSE 'minor' END AS severity,
              CASE WHEN r_status < 35 THEN 'open' WHEN r_status < 45 THEN 'fix_submitted' WHEN r_status < 95 THEN 'closed' ELSE 'voided' END AS status,
              CASE WHEN r_ret < 12 THEN 1 WHEN r_ret < 15 THEN 2 ELSE 0 END AS returns,
              coalesce(tc.ids[((p.position + p.n) % array_length(tc.ids, 1)) + 1], (SELECT ids[1] FROM b_trade_companies WHERE trade = 'mechanical')) AS company_id,
              (SELECT id FROM b_inspectors WHERE k = (p.n % ${INSPECTORS}) + 1) AS logged_by,
              (SELECT w.id FROM walks w WHERE w.level_id = p.level_id AND w.started_at <= p.logged_at ORDER BY w.started_at DESC LIMIT 1) AS walk_id
         FROM picked p LEFT JOIN b_trade_companies tc ON tc.trade = p.trade`,
      [size.findings, units],
    );
    // A space-only finding now and then (no unit): 1 in 25.
    await q(`UPDATE b_findings SET unit_id = NULL WHERE n % 25 = 0`);
    await q(`ALTER TABLE b_findings ADD PRIMARY KEY (n)`);
    await q(
      `INSERT INTO findings (id, job_id, number, unit_id, space_id, level_id, catalogue_item_id, walk_id, unit_check_id, severity, status, company_id,
                             due_on, note, return_count, logged_by, logged_at, voided_reason, version, created_at, updated_at)
       SELECT id, $1, n, unit_id, space_id, level_id, item_id, walk_id, NULL, severity, status, company_id,
              (logged_at AT TIME ZONE $2)::date + CASE severity WHEN 'critical' THEN 2 WHEN 'major' THEN 7 ELSE 14 END,
              CASE r_misc % 4 WHEN 0 THEN 'Seen from the ladder; photo taken.' WHEN 1 THEN 'Same as on the floor below.' WHEN 2 THEN '' ELSE 'Checked with the installer on site.' END,
              returns, logged_by, logged_at,
              CASE WHEN status = 'voided' THEN 'Logged twice; the other finding stays.' END,
              1 + 2 * returns + CASE status WHEN 'open' THEN 0 WHEN 'fix_submitted' THEN 1 WHEN 'closed' THEN CASE WHEN r_misc < 90 THEN 2 ELSE 1 END ELSE 1 END,
              logged_at, logged_at
         FROM b_findings`,
      [jobId, TIME_ZONE],
    );
    await q(`INSERT INTO job_finding_numbers (job_id, last_number) VALUES ($1, $2)`, [jobId, size.findings]);
    log(`bench seed: ${size.findings} findings (${Date.now() - started} ms)`);

    // Fixes: one per return, and one more for findings that are fix-submitted or closed by acceptance.
    // Step k of a finding's history happens 16 h x k after it was logged.
    await q(
      `CREATE TEMP TABLE b_fixes ON COMMIT DROP AS
       SELECT gen_random_uuid() AS id, f.n, f.id AS finding_id, s AS step, f.logged_at + make_interval(hours => 16 * (2 * s - 1)) AS at,
              (SELECT u.id FROM b_users u JOIN b_companies c ON c.k = u.company_k WHERE c.id = f.company_id ORDER BY u.email LIMIT 1) AS by_id,
              s <= f.returns AS returned
         FROM b_findings f
         CROSS JOIN LATERAL generate_series(1, f.returns + CASE WHEN f.status = 'fix_submitted' OR (f.status = 'closed' AND f.r_misc < 90) THEN 1 ELSE 0 END) s`,
    );
    await q(
      `INSERT INTO fixes (id, job_id, finding_id, submitted_by, note, submitted_at)
       SELECT id, $1, finding_id, by_id, CASE WHEN step = 1 THEN 'Fixed as asked; see the photo.' ELSE 'Redone after the return.' END, at FROM b_fixes`,
      [jobId],
    );
    // The history (append-only: INSERT only).
    await q(
      `INSERT INTO finding_events (id, finding_id, job_id, actor_id, at, kind, "from", "to", reason, photo_ids)
       SELECT gen_random_uuid(), id, $1::uuid, logged_by, logged_at, 'logged', NULL,
              jsonb_build_object('status', 'open', 'severity', severity, 'companyId', company_id,
                                 'dueOn', to_char((logged_at AT TIME ZONE $2::text)::date + CASE severity WHEN 'critical' THEN 2 WHEN 'major' THEN 7 ELSE 14 END, 'YYYY-MM-DD')),
              NULL, '{}'::uuid[]
         FROM b_findings
       UNION ALL
       SELECT gen_random_uuid(), x.finding_id, $1::uuid, x.by_id, x.at, 'fix_submitted', jsonb_build_object('status', 'open'),
              jsonb_build_object('status', 'fix_submitted', 'fixId', x.id, 'note', CASE WHEN x.step = 1 THEN 'Fixed as asked; see the photo.' ELSE 'Redone after the return.' END),
              NULL, '{}'::uuid[]
         FROM b_fixes x
       UNION ALL
       SELECT gen_random_uuid(), x.finding_id, $1::uuid, f.logged_by, x.at + interval '16 hours', 'returned',
              jsonb_build_object('status', 'fix_submitted', 'returnCount', x.step - 1), jsonb_build_object('status', 'open', 'returnCount', x.step),
              'Still loose at the hanger; tighten and photograph again.', '{}'::uuid[]
         FROM b_fixes x JOIN b_findings f ON f.n = x.n WHERE x.returned
       UNION ALL
       SELECT gen_random_uuid(), f.id, $1::uuid, f.logged_by, f.logged_at + make_interval(hours => 16 * (2 * f.returns + 2)), 'accepted',
              jsonb_build_object('status', 'fix_submitted', 'returnCount', f.returns), jsonb_build_object('status', 'closed', 'returnCount', f.returns), NULL, '{}'::uuid[]
         FROM b_findings f WHERE f.status = 'closed' AND f.r_misc < 90
       UNION ALL
       SELECT gen_random_uuid(), f.id, $1::uuid, f.logged_by, f.logged_at + make_interval(hours => 16 * (2 * f.returns + 1)), 'closed_on_walk',
              jsonb_build_object('status', 'open'), jsonb_build_object('status', 'closed'), 'Found fixed on the next walk.', '{}'::uuid[]
         FROM b_findings f WHERE f.status = 'closed' AND f.r_misc >= 90
       UNION ALL
       SELECT gen_random_uuid(), f.id, $1::uuid, (SELECT id FROM b_gcs WHERE k = (f.n % ${GC_MANAGERS}) + 1), f.logged_at + make_interval(hours => 16 * (2 * f.returns + 1)), 'voided',
              jsonb_build_object('status', 'open'), jsonb_build_object('status', 'voided'), 'Logged twice; the other finding stays.', '{}'::uuid[]
         FROM b_findings f WHERE f.status = 'voided'
       UNION ALL
       SELECT gen_random_uuid(), f.id, $1::uuid, x.by_id, f.logged_at + interval '3 hours', 'comment', NULL, '{}'::jsonb,
              'Ceiling tiles in this area come out on Thursday; fixing then.', '{}'::uuid[]
         FROM b_findings f JOIN LATERAL (SELECT by_id FROM b_fixes WHERE n = f.n LIMIT 1) x ON true WHERE f.r_misc % 10 = 3`,
      [jobId, TIME_ZONE],
    );
    log(`bench seed: fixes and finding events (${Date.now() - started} ms)`);
  });
  // As autovacuum would soon after a bulk load: statistics, and the visibility map that lets
  // counts use index-only scans.
  await sequelize.query('VACUUM ANALYZE');
  const seeded = await existing(sequelize);
  if (!seeded) throw new Error('The bench job was not found after seeding.');
  log(`bench seed: done in ${Math.round((Date.now() - started) / 1000)} s`);
  return { ...seeded, seeded: true };
}
