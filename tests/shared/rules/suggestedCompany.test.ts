/**
 * The company suggested for a defect type (shared/rules/suggestedCompany.ts): of the companies
 * covering the trade, the first by name, then by id. Names compare by the Unicode Collation
 * Algorithm (UTS #10, through Intl.Collator 'en'): letters before case, so "acme" comes before
 * "Beta" (a byte order would put "Beta" first).
 */
import { suggestedCompany } from '../../../shared/rules/suggestedCompany';

const company = (id: string, name: string, trades: string[]) => ({ id, name, trades });

describe('suggestedCompany', () => {
  it('picks the first by name among the companies that cover the trade', () => {
    const companies = [company('c', 'Northwind Mechanical', ['mechanical']), company('a', 'Zephyr Air', ['mechanical']), company('b', 'Alpha Electric', ['electrical'])];
    expect(suggestedCompany(companies, 'mechanical')?.id).toBe('c');
    expect(suggestedCompany(companies, 'electrical')?.id).toBe('b');
  });

  it('breaks a tie between equal names by id, whatever order the companies arrive in', () => {
    const x = company('00000000-0000-4000-8000-00000000000b', 'Same Name Ltd', ['mechanical']);
    const y = company('00000000-0000-4000-8000-00000000000a', 'Same Name Ltd', ['mechanical']);
    expect(suggestedCompany([x, y], 'mechanical')).toBe(y);
    expect(suggestedCompany([y, x], 'mechanical')).toBe(y);
  });

  it('orders names by collation, not by bytes (UTS #10)', () => {
    expect(suggestedCompany([company('1', 'Beta HVAC', ['mechanical']), company('2', 'acme hvac', ['mechanical'])], 'mechanical')?.id).toBe('2');
  });

  it('suggests nothing without a trade or without a company covering it', () => {
    const companies = [company('a', 'Alpha', ['mechanical'])];
    expect(suggestedCompany(companies, undefined)).toBeUndefined();
    expect(suggestedCompany(companies, 'ceilings')).toBeUndefined();
  });
});
