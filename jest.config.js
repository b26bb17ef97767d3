/**
 * Four projects, one runner:
 * - shared: pure calculations and schemas (ts-jest, node)
 * - server: API tests with supertest against the real PostgreSQL (ts-jest, node)
 * - components: screen components (jest-expo preset)
 * - e2e: a real chromium driven by playwright-core against the built web app
 * scripts/test.ts sets DATABASE_URL and the other services before calling jest.
 */
const tsJest = ['ts-jest', { tsconfig: '<rootDir>/server/tsconfig.json' }];
// shared/rules/csvRead.ts imports csv-parse's browser build (ES modules, for Metro); jest runs
// CommonJS, so it gets the package's CommonJS build of the same parser.
const csvParse = { '^csv-parse/browser/esm/sync$': 'csv-parse/sync' };

module.exports = {
  // Real scrypt hashes, a real database and a real browser: generous on a busy 2-core machine.
  // (testTimeout is a global option: jest ignores it inside a project.)
  testTimeout: 60_000,
  projects: [
    {
      displayName: 'shared',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/tests/shared/**/*.test.ts'],
      transform: { '^.+\\.tsx?$': tsJest },
      moduleNameMapper: csvParse,
    },
    {
      displayName: 'server',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/tests/server/**/*.test.ts'],
      transform: { '^.+\\.tsx?$': tsJest },
      moduleNameMapper: csvParse,
    },
    {
      displayName: 'components',
      rootDir: __dirname,
      preset: 'jest-expo',
      moduleNameMapper: csvParse,
      testMatch: ['<rootDir>/tests/components/**/*.test.tsx'],
    },
    {
      displayName: 'e2e',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/tests/e2e/**/*.test.ts'],
      transform: { '^.+\\.tsx?$': tsJest },
      moduleNameMapper: csvParse,
      setupFilesAfterEnv: ['<rootDir>/tests/support/e2eRetry.ts'],
    },
  ],
};
