/**
 * The company suggested as responsible for a defect type: of the job's companies whose trades
 * include the type's trade, the first by name, and by id between equal names (so the choice
 * never depends on the order rows arrive in). The form preselects it and the server assigns it
 * when the body names no company.
 */

export interface CompanyCandidate {
  id: string;
  name: string;
  trades: readonly string[];
}

/** One collation everywhere: the runtime's default locale would differ between a phone and the server. */
const byName = new Intl.Collator('en', { sensitivity: 'variant' });

export function compareCompanies(a: Pick<CompanyCandidate, 'id' | 'name'>, b: Pick<CompanyCandidate, 'id' | 'name'>): number {
  return byName.compare(a.name, b.name) || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);
}

/** Said when a finding names no company and none of the job's covers its trade (server and form alike). */
export function noCompanyForTrade(trade: string): string {
  return `No company on this job covers the ${trade} trade; choose the responsible company.`;
}

export function suggestedCompany<C extends CompanyCandidate>(companies: readonly C[], trade: string | undefined | null): C | undefined {
  if (!trade) return undefined;
  return companies.filter((c) => c.trades.includes(trade)).sort(compareCompanies)[0];
}
