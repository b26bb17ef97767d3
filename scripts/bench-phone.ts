/**
 * The phone measure alone (scripts/lib/benchPhone.ts) against a running server:
 *
 *   BENCH_BASE_URL=http://127.0.0.1:3000 npx tsx scripts/bench-phone.ts
 *
 * Signs in as BENCH_PHONE_EMAIL / BENCH_PHONE_PASSWORD (the demo inspector by default); the job
 * and level are BENCH_PHONE_JOB_ID / BENCH_PHONE_LEVEL_ID, or else the first job the account sees
 * and its level with the most units. BENCH_PHONE_RUNS (3), CHROMIUM_PATH (/usr/bin/chromium).
 */
import { formatPhone, measurePhone, sessionCookies } from './lib/benchPhone';

const DEMO_INSPECTOR = 'inspector@demo.trimout.example';
// The demo's published password (server/seed/demo.ts): the demo seed never runs in production.
const DEMO_PASSWORD = 'trimout-demo-2026';

async function getJson<T>(url: string, cookie: string): Promise<T> {
  const res = await fetch(url, { headers: { cookie, accept: 'application/json' } });
  if (!res.ok) throw new Error(`${url} answered ${res.status}`);
  return (await res.json()) as T;
}

async function pickLevel(baseUrl: string, email: string, password: string): Promise<{ jobId: string; levelId: string }> {
  const cookie = (await sessionCookies(baseUrl, email, password)).map((c) => `${c.name}=${c.value}`).join('; ');
  const jobId = process.env.BENCH_PHONE_JOB_ID ?? (await getJson<{ items: { id: string }[] }>(`${baseUrl}/api/jobs`, cookie)).items[0]?.id;
  if (!jobId) throw new Error(`${email} is on no job.`);
  if (process.env.BENCH_PHONE_LEVEL_ID) return { jobId, levelId: process.env.BENCH_PHONE_LEVEL_ID };
  const levels = (await getJson<{ items: { id: string; unitCount: number }[] }>(`${baseUrl}/api/jobs/${jobId}/levels`, cookie)).items;
  const level = [...levels].sort((a, b) => b.unitCount - a.unitCount)[0];
  if (!level || level.unitCount === 0) throw new Error('The job has no level with units.');
  return { jobId, levelId: level.id };
}

async function main() {
  const baseUrl = (process.env.BENCH_BASE_URL ?? process.argv[2] ?? '').replace(/\/$/, '');
  if (!baseUrl) throw new Error('Set BENCH_BASE_URL (or pass the base URL), e.g. http://127.0.0.1:3000.');
  const email = process.env.BENCH_PHONE_EMAIL ?? DEMO_INSPECTOR;
  const password = process.env.BENCH_PHONE_PASSWORD ?? DEMO_PASSWORD;
  const { jobId, levelId } = await pickLevel(baseUrl, email, password);
  const figures = await measurePhone({
    baseUrl,
    chromiumPath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    signIn: { email, password },
    jobId,
    levelId,
    runs: process.env.BENCH_PHONE_RUNS ? Number(process.env.BENCH_PHONE_RUNS) : undefined,
    log: (m) => console.error(m),
  });
  console.log(formatPhone(figures));
  if (process.env.BENCH_PHONE_JSON) console.log(JSON.stringify(figures, null, 2));
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
