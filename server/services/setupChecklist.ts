/**
 * What a job still misses before a walk makes sense (GET /jobs/:jobId/setup/checklist), each line
 * one SQL count with its first few names. "Where a refrigerant check needs them": a space served by
 * a unit on a system needs its floor area and ceiling height (shared/calc/refrigerant.ts works on
 * the room's volume); a system with units needs a charge, and a limit (stored for its refrigerant,
 * or entered on the system with its source).
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import { CONCENTRATION_LIMITS } from '../../shared/calc/refrigerant';
import { SETUP_CHECK_EXAMPLES, type SetupCheckKey, type SetupCheckLine, type SetupChecklist } from '../../shared/schemas/setup';

interface Check {
  key: SetupCheckKey;
  section: SetupCheckLine['section'];
  /** Names of the rows the line is about, in order; $1 is the job, $2 the refrigerants with a stored limit. */
  sql: string;
}

const CHECKS: Check[] = [
  { key: 'no_levels', section: 'levels', sql: `SELECT 'the job' AS name WHERE NOT EXISTS (SELECT 1 FROM levels WHERE job_id = $1)` },
  {
    key: 'levels_without_spaces',
    section: 'spaces',
    sql: `SELECT l.name FROM levels l WHERE l.job_id = $1 AND NOT EXISTS (SELECT 1 FROM spaces s WHERE s.level_id = l.id) ORDER BY l.position, l.name`,
  },
  {
    key: 'spaces_without_size',
    section: 'spaces',
    sql: `SELECT s.name FROM spaces s
           WHERE s.job_id = $1 AND s.enclosed AND (s.floor_area IS NULL OR s.ceiling_height IS NULL)
             AND EXISTS (SELECT 1 FROM units u WHERE u.space_id = s.id AND u.system_id IS NOT NULL)
           ORDER BY s.name`,
  },
  {
    key: 'systems_without_charge',
    section: 'systems',
    sql: `SELECT sy.name FROM systems sy
           WHERE sy.job_id = $1 AND sy.factory_charge IS NULL AND sy.field_charge IS NULL
             AND EXISTS (SELECT 1 FROM units u WHERE u.system_id = sy.id)
           ORDER BY sy.name`,
  },
  {
    key: 'systems_without_limit',
    section: 'systems',
    sql: `SELECT sy.name FROM systems sy
           WHERE sy.job_id = $1 AND sy.concentration_limit_override IS NULL AND NOT (sy.refrigerant = ANY($2::text[]))
           ORDER BY sy.name`,
  },
  { key: 'no_units', section: 'units', sql: `SELECT 'the job' AS name WHERE NOT EXISTS (SELECT 1 FROM units WHERE job_id = $1)` },
  { key: 'units_without_space', section: 'units', sql: `SELECT u.tag AS name FROM units u WHERE u.job_id = $1 AND u.space_id IS NULL ORDER BY u.tag` },
  { key: 'units_without_system', section: 'units', sql: `SELECT u.tag AS name FROM units u WHERE u.job_id = $1 AND u.system_id IS NULL ORDER BY u.tag` },
  {
    key: 'models_without_limits',
    section: 'models',
    sql: `SELECT m.name FROM unit_models m WHERE m.job_id = $1 AND (m.limits IS NULL OR m.limits = '{}'::jsonb) ORDER BY m.name`,
  },
  {
    key: 'pending_invitations',
    section: 'members',
    sql: `SELECT t.email AS name FROM auth_tokens t
           WHERE t.job_id = $1 AND t.purpose = 'invitation' AND t.used_at IS NULL AND t.revoked_at IS NULL AND t.expires_at > now()
           ORDER BY t.created_at`,
  },
];

export async function loadSetupChecklist(sequelize: Sequelize, jobId: string): Promise<SetupChecklist> {
  const stored = [...new Set(CONCENTRATION_LIMITS.map((l) => l.refrigerant))];
  const lines: SetupCheckLine[] = [];
  for (const check of CHECKS) {
    const bind: unknown[] = check.sql.includes('$2') ? [jobId, stored] : [jobId];
    const rows = await sequelize.query<{ name: string }>(check.sql, { bind, type: QueryTypes.SELECT });
    if (rows.length > 0) lines.push({ key: check.key, count: rows.length, examples: rows.slice(0, SETUP_CHECK_EXAMPLES).map((r) => r.name), section: check.section });
  }
  // Without levels, nothing else can be set up yet: say that first, with the invitations.
  const shown = lines.some((l) => l.key === 'no_levels') ? lines.filter((l) => l.key === 'no_levels' || l.key === 'no_units' || l.key === 'pending_invitations') : lines;
  return { complete: lines.length === 0, lines: shown };
}
