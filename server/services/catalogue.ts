/** A job's defect catalogue starts as a copy of Trimout's built-in catalogue. */
import type { Transaction } from 'sequelize';
import { BUILTIN_CATALOGUE } from '../../shared/catalogue';
import { CatalogueItem } from '../models';

/** Copies every built-in item the job does not hold yet (by code). Returns how many were added. */
export async function copyBuiltinCatalogue(jobId: string, transaction: Transaction): Promise<number> {
  const held = new Set(
    (await CatalogueItem.findAll({ where: { jobId }, attributes: ['code'], transaction })).map((i) => i.code),
  );
  const rows = BUILTIN_CATALOGUE.map((item, index) => ({ item, index }))
    .filter(({ item }) => !held.has(item.code))
    .map(({ item, index }) => ({
      jobId,
      code: item.code,
      group: item.group,
      title: item.title,
      description: item.description,
      unitKinds: [...item.unitKinds],
      defaultSeverity: item.defaultSeverity,
      trade: item.trade,
      measuredRule: item.measuredRule ?? null,
      fixGuidance: item.fixGuidance,
      caution: item.caution ?? null,
      needsCeilingAccess: item.needsCeilingAccess,
      builtin: true,
      position: index + 1,
    }));
  if (rows.length > 0) await CatalogueItem.bulkCreate(rows, { transaction });
  return rows.length;
}
