/**
 * Witnessing a test record (POST /test-records/:recordId/witness): an inspector or a GC manager
 * confirms what was recorded. Order: the record in the caller's scope (404) → not the witness's own
 * record (403 witness_own_record) → If-Match (428 missing, 412 stale with the current record) →
 * superseded (409 superseded) → already witnessed (409 already_witnessed) → witnessed, version + 1.
 * A witnessed record is locked: the database refuses any later change (migration
 * 20261203130000-create-test-records); a correction is a new record that supersedes it.
 */
import { QueryTypes } from 'sequelize';
import type { TestRecordDto, WitnessTestRecordInput } from '../../shared/schemas/testRecords';
import { conflict, forbidden, notFound } from '../errors';
import { checkVersion } from '../services/versioning';
import { testRecordDetail } from '../services/testRecords';
import type { CommandContext } from './context';

export async function witnessTest(ctx: CommandContext, recordId: string, ifMatch: string | undefined, body: WitnessTestRecordInput): Promise<TestRecordDto> {
  const { sequelize, transaction, actor, scope, clock } = ctx;
  await sequelize.query(`SELECT id FROM test_records WHERE id = $1 AND job_id = $2 FOR UPDATE`, { bind: [recordId, scope.jobId], type: QueryTypes.SELECT, transaction });
  const current = await testRecordDetail(sequelize, scope, recordId, transaction);
  if (!current) throw notFound('Test record not found.');
  if (current.recordedBy.id === actor.id) {
    throw forbidden('A record is witnessed by someone other than the person who made it.', 'witness_own_record');
  }
  checkVersion(ifMatch, current.version, current);
  if (!current.current) throw conflict('This record was corrected by a newer one: witness the newer record.', 'superseded');
  if (current.locked) throw conflict('This record is already witnessed.', 'already_witnessed');
  await sequelize.query(
    `UPDATE test_records SET witnessed_by = $1, witnessed_at = $2, witness_note = $3, version = version + 1, updated_at = $2 WHERE id = $4`,
    { bind: [actor.id, clock(), body.note ? body.note : null, recordId], transaction },
  );
  return (await testRecordDetail(sequelize, scope, recordId, transaction))!;
}
