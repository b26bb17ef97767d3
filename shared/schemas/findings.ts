/**
 * Walks, unit checks and findings: request schemas (zod, strict) and response types, one file per
 * resource under shared/schemas/findings/. This file only re-exports them, so every importer keeps
 * one path. The walk screens use these schemas with zodResolver; the server validates every request
 * with the same ones (server/routes/walks.ts, checks.ts, findings.ts, correction.ts).
 * See docs/api-findings.md for the routes, roles and status codes.
 *
 * Every path is under /api/jobs/:jobId. Quantities are sent as the trade types them
 * ("34 in", "4' 10-1/2\"", "1486 mm") and stored in base units (shared/calc/quantity.ts).
 *
 * Stable contract: change it by adding, never by renaming or removing.
 */
export * from './findings/common';
export * from './findings/params';
export * from './findings/walks';
export * from './findings/walkUnits';
export * from './findings/checks';
export * from './findings/finding';
export * from './findings/create';
export * from './findings/filters';
export * from './findings/actions';
export * from './findings/fix';
export * from './findings/photos';
export * from './findings/reinspect';
export * from './findings/change';
export * from './findings/comments';
export * from './findings/bulk';
export * from './findings/inbox';
export * from './findings/batch';
