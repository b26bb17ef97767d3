/**
 * `npm test`: a throwaway PostgreSQL cluster (fsync off) built by the migrations, the
 * typecheck, the lint (eslint), every jest project (shared, server, components, e2e in a
 * real chromium), then one plain line of totals: `N passed, N failed`. Exits non-zero on any failure.
 */
import fs from 'node:fs';
import path from 'node:path';
import { connect, migrate } from '../server/db';
import { upgradeBuiltinCatalogues } from '../server/services/catalogueUpgrade';
import { ensureDatabase, removeCluster, startCluster, type Cluster } from './lib/postgres';
import { aptInstall, runInherit, say } from './lib/run';
import { ensurePdfTools } from './lib/poppler';
import { buildWebIfStale } from './lib/web';

const root = path.resolve(__dirname, '..');
const artifacts = path.join(root, '.artifacts');
export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
/** Whether an import cycle found by madge fails the lint item (false: printed, not counted). */
const CYCLES_FAIL_LINT = true;

interface JestReport {
  testResults: { name: string; assertionResults: { fullName: string; status: string; invocations?: number }[] }[];
  numPassedTests: number;
  numFailedTests: number;
  numPendingTests: number;
  numTotalTests: number;
  numRuntimeErrorTestSuites: number;
  numFailedTestSuites: number;
  success: boolean;
}

async function main(): Promise<number> {
  let passed = 0;
  let failed = 0;
  let skipped = 0;
  fs.mkdirSync(artifacts, { recursive: true });

  const testDir = path.join(root, '.pgtest');
  const pgPort = Number(process.env.TRIMOUT_TEST_PG_PORT ?? 54339);
  // A cluster left behind by an interrupted run is stopped and thrown away.
  let cluster: Cluster | undefined;
  if (fs.existsSync(testDir)) {
    try {
      (await startCluster({ dataDir: testDir, port: pgPort, throwaway: true })).stop();
    } catch {
      // it may not start at all; it is removed below either way
    }
    removeCluster(testDir);
  }
  try {
    cluster = await startCluster({ dataDir: testDir, port: pgPort, throwaway: true });
    await ensureDatabase(cluster, 'trimout_test');
    const databaseUrl = cluster.url('trimout_test');
    const db = connect(databaseUrl);
    await migrate(db.sequelize);
    await upgradeBuiltinCatalogues(db.sequelize);
    await db.close();

    if (!fs.existsSync(CHROMIUM)) aptInstall(['chromium']);
    ensurePdfTools();

    say('typecheck ...');
    for (const project of ['tsconfig.json', 'server/tsconfig.json']) {
      const code = await runInherit(path.join(root, 'node_modules', '.bin', 'tsc'), ['--noEmit', '-p', project], { cwd: root });
      if (code === 0) passed += 1;
      else {
        failed += 1;
        console.error(`typecheck of ${project} failed`);
      }
    }

    say('lint ...');
    const lint = await runInherit(path.join(root, 'node_modules', '.bin', 'eslint'), ['.'], { cwd: root });
    // Import cycles (madge, `npm run cycles`) are part of the lint. Reported only while
    // CYCLES_FAIL_LINT is false; set it to true to make a cycle fail the lint item.
    const cycles = await runInherit('npm', ['run', '--silent', 'cycles'], { cwd: root });
    if (cycles !== 0) {
      console.error(
        CYCLES_FAIL_LINT ? 'import cycles found (npm run cycles)' : 'import cycles found (npm run cycles): reported, not counted as a failure yet',
      );
    }
    if (lint === 0 && (cycles === 0 || !CYCLES_FAIL_LINT)) passed += 1;
    else {
      failed += 1;
      console.error('lint failed');
    }

    // Without a web build the browser tests cannot run; every other project still does.
    let projects: string[] = [];
    try {
      await buildWebIfStale(path.join(root, 'dist'));
    } catch (err) {
      failed += 1;
      console.error(`The web app did not build, so the browser tests are not run: ${err instanceof Error ? err.message : err}`);
      projects = ['--selectProjects', 'shared', 'server', 'components'];
    }

    const report = path.join(artifacts, 'jest-report.json');
    fs.rmSync(report, { force: true });
    say('jest: shared, server, components, e2e ...');
    const jestArgs = ['--runInBand', '--json', '--outputFile', report, ...projects, ...process.argv.slice(2)];
    await runInherit(path.join(root, 'node_modules', '.bin', 'jest'), jestArgs, {
      cwd: root,
      env: {
        ...process.env,
        NODE_ENV: 'test',
        TZ: 'UTC',
        DATABASE_URL: databaseUrl,
        WEB_DIST: path.join(root, 'dist'),
        CHROMIUM_PATH: CHROMIUM,
        TRIMOUT_ARTIFACTS: artifacts,
      },
    });
    if (!fs.existsSync(report)) {
      console.error('jest wrote no report: counting the run as failed.');
      failed += 1;
    } else {
      const r = JSON.parse(fs.readFileSync(report, 'utf8')) as JestReport;
      // Browser tests get a second try (tests/support/e2eRetry.ts); those that needed it are named.
      const retried = r.testResults.flatMap((file) =>
        file.assertionResults
          .filter((t) => t.status === 'passed' && (t.invocations ?? 1) > 1)
          .map((t) => `  ${path.relative(root, file.name)} › ${t.fullName}`),
      );
      if (retried.length) {
        console.log(`\nPassed only on a second try (flaky: look at these):\n${retried.join('\n')}`);
        fs.writeFileSync(path.join(artifacts, 'retried-tests.txt'), retried.join('\n') + '\n');
      }
      passed += r.numPassedTests;
      failed += r.numFailedTests + r.numRuntimeErrorTestSuites;
      skipped += r.numPendingTests;
      if (r.numTotalTests === 0) {
        console.error('jest ran no test: counting the run as failed.');
        failed += 1;
      }
    }
  } catch (err) {
    console.error(`\nThe test run could not complete: ${err instanceof Error ? err.message : String(err)}`);
    failed += 1;
  } finally {
    try {
      cluster?.stop();
      if (cluster) removeCluster(cluster.dataDir);
    } catch (err) {
      console.error('Could not remove the test database:', err instanceof Error ? err.message : err);
    }
  }
  console.log('');
  console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
  return failed === 0 ? 0 : 1;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(err);
    console.log('0 passed, 1 failed');
    process.exit(1);
  },
);
