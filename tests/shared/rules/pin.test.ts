/**
 * Who may place a finding's pin on the plan, in which status (shared/findingStatus.ts decidePin).
 * Written out by hand from the product rule: GC managers and inspectors, any status but voided
 * (a voided finding is not drawn on the plan).
 */
import { decidePin } from '../../../shared/findingStatus';
import { FINDING_STATUSES, ROLES, type FindingStatus, type Role } from '../../../shared/words';

const ALLOWED: Record<Role, FindingStatus[]> = {
  gc_manager: ['open', 'fix_submitted', 'closed'],
  inspector: ['open', 'fix_submitted', 'closed'],
  subcontractor: [],
};

describe('decidePin', () => {
  it.each(ROLES.flatMap((role) => FINDING_STATUSES.map((status) => [role, status] as const)))('%s on a %s finding', (role, status) => {
    const d = decidePin(status, role);
    if (ALLOWED[role].includes(status)) expect(d).toEqual({ allowed: true, to: status });
    else expect(d).toMatchObject({ allowed: false, code: role === 'subcontractor' ? 403 : 409 });
  });
});
