/**
 * Companies on the job.
 */
import { z } from 'zod';
import { TRADE_KEYS, type TradeKey } from '../../words';
import { id, text, pageQuery } from './fields';

const tradesSchema = z
  .array(z.enum(TRADE_KEYS, { error: 'Choose trades from the list.' }))
  .max(TRADE_KEYS.length)
  .refine((t) => new Set(t).size === t.length, 'A trade appears twice.');

/** POST /companies: link a company the GC already works with (by id), or create one by name. */
export const addJobCompanySchema = z.union(
  [
    z.object({ companyId: id('company'), trades: tradesSchema }).strict(),
    z.object({ name: text('a company name', 120), trades: tradesSchema }).strict(),
  ],
  { error: 'Send either companyId and trades, or name and trades.' },
);
export type AddJobCompanyInput = z.input<typeof addJobCompanySchema>;
export const updateJobCompanySchema = z.object({ trades: tradesSchema }).strict();
export type UpdateJobCompanyInput = z.input<typeof updateJobCompanySchema>;
export const companyListQuerySchema = z.object({ trade: z.enum(TRADE_KEYS).optional(), ...pageQuery }).strict();

export interface JobCompanyDto {
  /** The company's id (also the :companyId of the routes). */
  id: string;
  name: string;
  trades: TradeKey[];
  /** True for the job's owner (the GC): it cannot be removed. */
  isOwner: boolean;
  memberCount: number;
  version: number;
}

/** GET /api/companies/known: companies the caller's company already works with (for linking). */
export interface KnownCompanyDto {
  id: string;
  name: string;
}
