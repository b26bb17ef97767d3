/**
 * Mail preferences: a signed-in person's change (If-Match on the version they saw), and the
 * unsubscribe link turning one list off. Each runs in one transaction with the row locked, so
 * two changes at once never interleave.
 */
import type { Request } from 'express';
import type { Sequelize } from 'sequelize';
import type { PreferencesPatch, UnsubscribeList } from '../../shared/schemas/preferences';
import { loadPreferences, lockPreferencesRow, updatePreferences, type EffectivePreferences } from '../digests/preferences';
import { notFound } from '../errors';
import { checkIfMatch } from '../services/versioning';

/**
 * `req` is only read for its If-Match header (checkIfMatch answers 428/412 with what the server
 * holds now); `present` words that current state the way the route answers it.
 */
export async function changePreferences(
  sequelize: Sequelize,
  userId: string,
  patch: PreferencesPatch,
  ifMatch: { req: Request; present: (p: EffectivePreferences) => unknown },
): Promise<EffectivePreferences> {
  const prefs = await sequelize.transaction(async (transaction) => {
    const row = await lockPreferencesRow(sequelize, userId, transaction);
    const before = await loadPreferences(sequelize, userId, transaction);
    checkIfMatch(ifMatch.req, row.version, before ? ifMatch.present(before) : undefined);
    await updatePreferences(sequelize, userId, patch, transaction);
    return loadPreferences(sequelize, userId, transaction);
  });
  if (!prefs) throw notFound('Your account was not found.');
  return prefs;
}

/** The unsubscribe link: turns its list off (doing it twice changes nothing). */
export async function turnOffMailList(sequelize: Sequelize, userId: string, list: UnsubscribeList): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    await lockPreferencesRow(sequelize, userId, transaction);
    await updatePreferences(sequelize, userId, list === 'digest' ? { digestFrequency: 'off' } : { criticalAssignmentMail: false }, transaction);
  });
}
