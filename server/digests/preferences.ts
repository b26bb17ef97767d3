/**
 * Mail preferences with their defaults. A user without a user_preferences row (or with NULL in a
 * column) has the defaults: a daily digest at 07:00 when they are a GC manager or a subcontractor
 * on some job, none otherwise (inspectors); the time zone of their first job (earliest membership;
 * UTC without a job); the critical-assignment mail on. Raw SQL, bound parameters only.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import {
  DEFAULT_DIGEST_HOUR,
  DEFAULT_DIGEST_WEEKDAY,
  type DigestFrequency,
  type PreferencesDto,
  type PreferencesPatch,
} from '../../shared/schemas/preferences';

export interface EffectivePreferences {
  userId: string;
  email: string;
  name: string;
  companyId: string;
  digestFrequency: DigestFrequency;
  digestWeekday: number;
  digestHour: number;
  timeZone: string;
  timeZoneIsDefault: boolean;
  criticalAssignmentMail: boolean;
  isDefault: boolean;
  version: number;
}

interface Row {
  user_id: string;
  email: string;
  name: string;
  company_id: string;
  digest_frequency: DigestFrequency;
  digest_weekday: number;
  digest_hour: number;
  time_zone: string;
  time_zone_is_default: boolean;
  critical_assignment_mail: boolean;
  is_default: boolean;
  version: number;
}

/** Every active, confirmed user's preferences with the defaults filled in ($1: one user or NULL for all). */
const EFFECTIVE_SQL = `
  SELECT u.id AS user_id, u.email, u.name, u.company_id,
         COALESCE(p.digest_frequency,
           CASE WHEN EXISTS (SELECT 1 FROM job_members m WHERE m.user_id = u.id AND m.role IN ('gc_manager', 'subcontractor'))
                THEN 'daily' ELSE 'off' END) AS digest_frequency,
         COALESCE(p.digest_weekday, ${DEFAULT_DIGEST_WEEKDAY})::int AS digest_weekday,
         COALESCE(p.digest_hour, ${DEFAULT_DIGEST_HOUR})::int AS digest_hour,
         COALESCE(p.time_zone,
           (SELECT j.time_zone FROM job_members m JOIN jobs j ON j.id = m.job_id
             WHERE m.user_id = u.id ORDER BY m.created_at, m.id LIMIT 1),
           'UTC') AS time_zone,
         p.time_zone IS NULL AS time_zone_is_default,
         COALESCE(p.critical_assignment_mail, true) AS critical_assignment_mail,
         p.user_id IS NULL AS is_default,
         COALESCE(p.version, 1)::int AS version
    FROM users u
    LEFT JOIN user_preferences p ON p.user_id = u.id
   WHERE u.disabled_at IS NULL AND u.email_confirmed_at IS NOT NULL
     AND ($1::uuid IS NULL OR u.id = $1::uuid)`;

function fromRow(r: Row): EffectivePreferences {
  return {
    userId: r.user_id,
    email: r.email,
    name: r.name,
    companyId: r.company_id,
    digestFrequency: r.digest_frequency,
    digestWeekday: Number(r.digest_weekday),
    digestHour: Number(r.digest_hour),
    timeZone: r.time_zone,
    timeZoneIsDefault: r.time_zone_is_default,
    criticalAssignmentMail: r.critical_assignment_mail,
    isDefault: r.is_default,
    version: Number(r.version),
  };
}

export async function loadPreferences(sequelize: Sequelize, userId: string, transaction?: Transaction): Promise<EffectivePreferences | null> {
  const rows = await sequelize.query<Row>(EFFECTIVE_SQL, { bind: [userId], type: QueryTypes.SELECT, transaction });
  return rows[0] ? fromRow(rows[0]) : null;
}

/** Everyone's effective preferences whose digest is not off (the hourly scheduler reads these). */
export async function loadDigestRecipients(sequelize: Sequelize): Promise<EffectivePreferences[]> {
  const rows = await sequelize.query<Row>(`SELECT * FROM (${EFFECTIVE_SQL}) x WHERE digest_frequency <> 'off' ORDER BY user_id`, {
    bind: [null],
    type: QueryTypes.SELECT,
  });
  return rows.map(fromRow);
}

export function preferencesDto(p: EffectivePreferences, mailboxPath: string | null): PreferencesDto {
  return {
    digestFrequency: p.digestFrequency,
    digestWeekday: p.digestWeekday,
    digestHour: p.digestHour,
    timeZone: p.timeZone,
    timeZoneIsDefault: p.timeZoneIsDefault,
    criticalAssignmentMail: p.criticalAssignmentMail,
    isDefault: p.isDefault,
    mailboxPath,
    version: p.version,
  };
}

/**
 * Makes the user's row if it does not exist yet (version 1, every column "default"), then locks it
 * (SELECT ... FOR UPDATE) so the caller can check If-Match against the version and change it.
 */
export async function lockPreferencesRow(sequelize: Sequelize, userId: string, transaction: Transaction): Promise<{ version: number }> {
  await sequelize.query(
    `INSERT INTO user_preferences (user_id, digest_frequency, digest_weekday, digest_hour, time_zone, critical_assignment_mail, version, created_at, updated_at)
     VALUES ($1, NULL, ${DEFAULT_DIGEST_WEEKDAY}, ${DEFAULT_DIGEST_HOUR}, NULL, true, 1, now(), now())
     ON CONFLICT (user_id) DO NOTHING`,
    { bind: [userId], transaction },
  );
  const [row] = await sequelize.query<{ version: number }>(`SELECT version FROM user_preferences WHERE user_id = $1 FOR UPDATE`, {
    bind: [userId],
    type: QueryTypes.SELECT,
    transaction,
  });
  return { version: Number(row!.version) };
}

/** Applies a validated change to the locked row and raises its version. */
export async function updatePreferences(sequelize: Sequelize, userId: string, patch: PreferencesPatch, transaction: Transaction): Promise<void> {
  // Fixed column list; a value is only ever a bound parameter. "Unchanged" is a NULL flag.
  await sequelize.query(
    `UPDATE user_preferences SET
       digest_frequency = CASE WHEN $2::boolean THEN $3::varchar ELSE digest_frequency END,
       digest_weekday = COALESCE($4::smallint, digest_weekday),
       digest_hour = COALESCE($5::smallint, digest_hour),
       time_zone = CASE WHEN $6::boolean THEN $7::varchar ELSE time_zone END,
       critical_assignment_mail = COALESCE($8::boolean, critical_assignment_mail),
       version = version + 1,
       updated_at = now()
     WHERE user_id = $1`,
    {
      bind: [
        userId,
        patch.digestFrequency !== undefined,
        patch.digestFrequency ?? null,
        patch.digestWeekday ?? null,
        patch.digestHour ?? null,
        patch.timeZone !== undefined,
        patch.timeZone ?? null,
        patch.criticalAssignmentMail ?? null,
      ],
      transaction,
    },
  );
}
