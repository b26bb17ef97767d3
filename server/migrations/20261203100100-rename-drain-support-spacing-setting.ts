import type { QueryInterface } from 'sequelize';

/**
 * The job setting a drain's support spacing is checked against was stored under the key
 * `max_hanger_rod_spacing`, which reads as the spacing of a unit's hanging rods. It is the
 * longest span between condensate drain supports: renamed to `max_drain_support_spacing` in
 * each job's settings and in the measured rules of each job's catalogue that read it.
 * Recorded results (unit checks, findings, their events) keep the words they were saved with.
 */
const OLD = 'max_hanger_rod_spacing';
const NEW = 'max_drain_support_spacing';

async function rename(qi: QueryInterface, from: string, to: string) {
  const sql = (q: string) => qi.sequelize.query(q, { bind: [from, to] });
  await sql(`UPDATE jobs SET settings = (settings - $1::text) || jsonb_build_object($2::text, settings -> $1::text)
    WHERE settings ? $1::text`);
  for (const bound of ['limit', 'upper']) {
    await sql(`UPDATE catalogue_items
      SET measured_rule = jsonb_set(measured_rule, '{${bound},key}', to_jsonb($2::text))
      WHERE measured_rule -> '${bound}' ->> 'from' = 'job' AND measured_rule -> '${bound}' ->> 'key' = $1::text`);
  }
}

export async function up({ context: qi }: { context: QueryInterface }) {
  await rename(qi, OLD, NEW);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await rename(qi, NEW, OLD);
}
