/**
 * One source for a unit model's limits: the installation manual named once (title and edition),
 * each limit with an optional page, or a source of its own. Stored per limit as plain text
 * ("Cassette 24 installation manual, 2nd edition, p. 12"), so every reader of a limit keeps
 * showing where it came from.
 */

/** A page reference as typed beside a limit: "12", "p. 12", "page 12", "pp. 12-13", "12, fig. 4". */
const PAGE = /^(?:p\.?|pp\.?|page|pages)?\s*(\d[\w\-–/. ]{0,15}(?:,\s*(?:fig\.?|figure|table)\s*[\w\-.]{1,8})?)$/i;

/**
 * The source stored for one limit: its own source when it has one, else the manual with the
 * page when one is given, else the manual. '' when nothing names where the value came from.
 */
export function limitSource(manual: string, pageOrSource: string): string {
  const m = manual.trim();
  const t = pageOrSource.trim();
  if (t === '') return m;
  const page = PAGE.exec(t);
  if (!page) return t;
  return m === '' ? '' : `${m}, p. ${page[1]!.trim()}`;
}

/** True when a limit's text names only a page, which needs the manual to mean anything. */
export function isPageOnly(pageOrSource: string): boolean {
  return PAGE.test(pageOrSource.trim());
}

/**
 * Stored sources back into the form: the manual most limits cite (with or without a page) and,
 * per limit, its page ('' for the manual alone) or its own source.
 */
export function splitLimitSources(sources: readonly string[]): { manual: string; perLimit: string[] } {
  const base = (s: string) => s.trim().replace(/, p\. [^,]+(?:, (?:fig\.?|figure|table) \S+)?$/i, '');
  const counts = new Map<string, number>();
  for (const s of sources) {
    if (s.trim() === '') continue;
    const b = base(s);
    counts.set(b, (counts.get(b) ?? 0) + 1);
  }
  let manual = '';
  let best = 0;
  for (const [b, n] of counts) {
    if (n > best) {
      manual = b;
      best = n;
    }
  }
  // One limit with its own source is not a manual shared by the model.
  if (best < 2 && sources.filter((s) => s.trim() !== '').length > 1) manual = '';
  const perLimit = sources.map((s) => {
    const t = s.trim();
    if (manual === '' || t === '') return t;
    if (t === manual) return '';
    if (t.startsWith(`${manual}, p. `)) return t.slice(manual.length + 5);
    return t;
  });
  return { manual, perLimit };
}
