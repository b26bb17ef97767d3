/**
 * Job set-up: request schemas (zod, strict) and response types for jobs, levels, spaces,
 * systems, unit models, units (with CSV import/export), companies on a job, members and the
 * defect catalogue, one file per resource under shared/schemas/setup/. This file only re-exports
 * them, so every importer keeps one path. The screens use these schemas with zodResolver; the
 * server validates every request with the same ones (server/routes/*). See docs/api-setup.md for
 * the routes.
 *
 * Quantities are sent as the trade types them ("10' 6\"", "3.2 m", "38 lb", "3 tons") and
 * stored in base units (shared/calc/quantity.ts): lengths mm, areas m², volumes m³, mass kg,
 * capacity W, angle degrees. The schemas check the text parses; the server converts.
 *
 * Stable contract: change it by adding, never by renaming or removing.
 */
export * from './setup/common';
export * from './setup/params';
export * from './setup/limits';
export * from './setup/jobs';
export * from './setup/checklist';
export * from './setup/levels';
export * from './setup/spaces';
export * from './setup/systems';
export * from './setup/models';
export * from './setup/units';
export * from './setup/companies';
export * from './setup/crews';
export * from './setup/members';
export * from './setup/catalogue';
export * from './setup/ceilingExclusions';
