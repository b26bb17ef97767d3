/**
 * The GC's view of a job: levels board, readiness, company scorecards, recurring defects and the
 * open-findings trend, one file each. Every number is computed in PostgreSQL (GROUP BY,
 * FILTER (WHERE ...), window functions, percentile_cont), or read from the trigger-kept tallies;
 * Node only adds up those few rows and shapes them into the response types of
 * shared/schemas/board.ts. Heavy figures go through the exact cache of statCache.ts.
 * Definitions: docs/api-board.md; scope and shared definitions: common.ts.
 */
export { loadBoard } from './levels';
export { loadFloorSystems } from './floorSystems';
export { loadReadiness } from './readiness';
export { loadScorecards } from './scorecards';
export { loadRecurring, recurringThresholdsOf } from './recurring';
export { loadTrend } from './trend';
export { loadTallies, loadUnresolvedFigures, type UnresolvedFigure } from './common';
