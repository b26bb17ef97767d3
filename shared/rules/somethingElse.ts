/**
 * "Something else": a finding whose defect is not in the job's catalogue. It is logged against the
 * job's one "other" defect type (code OTHER, never offered in a checklist) and carries its own title.
 * Two such findings are the same defect when their titles are equal once normalised: the recurring
 * report counts them together, so a crew habit the catalogue lacks still shows up.
 */

/** The other type's code: not of the catalogue's own pattern (two letters, dash, digits), so no item can take it. */
export const OTHER_DEFECT_CODE = 'OTHER';
export const OTHER_DEFECT_TITLE = 'Something else';
export const DEFECT_TITLE_MAX = 160;

/** Case, surrounding and repeated white space do not make another defect ("Loose  grille" = "loose grille"). */
export function normaliseDefectTitle(title: string): string {
  return title.trim().replace(/\s+/g, ' ').toLowerCase();
}

/** The same normalisation in SQL, over a text expression (kept beside the TypeScript one so they agree). */
export function normalisedTitleSql(expr: string): string {
  return `lower(btrim(regexp_replace(${expr}, '\\s+', ' ', 'g')))`;
}

/** The code shown beside a finding's title: a Something else finding says so instead of its internal code. */
export function defectCodeWords(code: string): string {
  return code === OTHER_DEFECT_CODE ? OTHER_DEFECT_TITLE : code;
}
