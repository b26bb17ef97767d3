/** The health check's look at the database: one trivial query, never an error thrown. */
import type { Sequelize } from 'sequelize';

export interface HealthReport {
  server: 'ok';
  database: 'ok' | 'unreachable';
  checkedInMs: number;
  uptimeSeconds: number;
}

export async function databaseReachable(sequelize: Sequelize): Promise<boolean> {
  try {
    await sequelize.query('SELECT 1');
    return true;
  } catch {
    return false;
  }
}

export async function checkHealth(sequelize: Sequelize): Promise<HealthReport> {
  const started = Date.now();
  const database = (await databaseReachable(sequelize)) ? 'ok' : 'unreachable';
  return { server: 'ok', database, checkedInMs: Date.now() - started, uptimeSeconds: Math.round(process.uptime()) };
}
