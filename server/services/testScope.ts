/**
 * Which company answers for a system's test records, as SQL (a subcontractor's scope): the
 * system's own company (systems.company_id), or, when it names none (or the unit has no system),
 * every company on the job with the mechanical trade. `$1` is the job id.
 */
export function responsibleSql(sys: string, companyParam: string): string {
  return `(CASE WHEN ${sys}.company_id IS NOT NULL THEN ${sys}.company_id = ${companyParam}::uuid
    ELSE EXISTS (SELECT 1 FROM job_companies jc WHERE jc.job_id = $1 AND jc.company_id = ${companyParam}::uuid AND 'mechanical' = ANY (jc.trades)) END)`;
}
