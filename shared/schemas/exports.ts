/**
 * CSV exports (docs/api-exports.md). Every path is under /api/jobs/:jobId:
 *   GET /findings.csv   the findings list's query (findingListQuerySchema in ./findings; limit and cursor ignored)
 *   GET /units.csv      no query
 *   GET /scorecards.csv no query (GC manager, inspector)
 */
import { z } from 'zod';
import './plainWords';

/** Exports that take no query parameters: any parameter is refused (400), like every strict schema. */
export const noExportQuerySchema = z.object({}).strict();
