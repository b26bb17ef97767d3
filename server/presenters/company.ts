/** A company on a job → JobCompanyDto. */
import type { JobCompanyDto } from '../../shared/schemas/setup';
import type { Company, JobCompany } from '../models';

export function presentJobCompany(link: JobCompany, company: Company, extra: { isOwner: boolean; memberCount: number }): JobCompanyDto {
  return {
    id: company.id,
    name: company.name,
    trades: link.trades,
    isOwner: extra.isOwner,
    memberCount: extra.memberCount,
    version: link.version,
  };
}
