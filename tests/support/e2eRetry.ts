/**
 * Browser tests run a real chromium against a real server on a busy 2-core machine: a test that
 * fails is run once more (its beforeEach/afterEach hooks again, not its beforeAll) and the errors
 * of the first try are printed. scripts/test.ts lists every test that passed only on its second
 * try above the totals, so a flaky test is seen and mended, never silently absorbed.
 */
jest.retryTimes(1, { logErrorsBeforeRetry: true });
