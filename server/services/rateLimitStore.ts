/**
 * A store for express-rate-limit kept in PostgreSQL (table rate_limit_hits), so every server node
 * counts against the same limits. Each increment is one atomic upsert: a key whose window has
 * passed starts again at 1. Keys are prefixed with the limiter's name (and, in tests, the app's
 * namespace). Rows of windows long gone are pruned with the other housekeeping.
 */
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import { QueryTypes, type Sequelize } from 'sequelize';

interface Row {
  hits: number;
  reset_at: Date;
}

export class PostgresRateLimitStore implements Store {
  /** Counts are shared between processes, not local to this one. */
  localKeys = false;
  private windowMs = 60_000;

  constructor(
    private readonly sequelize: Sequelize,
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const [row] = await this.sequelize.query<Row>(`SELECT hits, reset_at FROM rate_limit_hits WHERE key = $1 AND reset_at > now()`, {
      bind: [this.prefix + key],
      type: QueryTypes.SELECT,
    });
    return row ? { totalHits: row.hits, resetTime: new Date(row.reset_at) } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const [row] = await this.sequelize.query<Row>(
      `INSERT INTO rate_limit_hits AS r (key, hits, reset_at) VALUES ($1, 1, now() + $2 * interval '1 millisecond')
       ON CONFLICT (key) DO UPDATE SET
         hits = CASE WHEN r.reset_at <= now() THEN 1 ELSE r.hits + 1 END,
         reset_at = CASE WHEN r.reset_at <= now() THEN excluded.reset_at ELSE r.reset_at END
       RETURNING hits, reset_at`,
      { bind: [this.prefix + key, this.windowMs], type: QueryTypes.SELECT },
    );
    return { totalHits: row!.hits, resetTime: new Date(row!.reset_at) };
  }

  async decrement(key: string): Promise<void> {
    await this.sequelize.query(`UPDATE rate_limit_hits SET hits = greatest(hits - 1, 0) WHERE key = $1 AND reset_at > now()`, {
      bind: [this.prefix + key],
    });
  }

  async resetKey(key: string): Promise<void> {
    await this.sequelize.query(`DELETE FROM rate_limit_hits WHERE key = $1`, { bind: [this.prefix + key] });
  }
}

/** Makes the store of one named limiter. */
export type RateLimitStores = (name: string) => Store;

export function postgresRateLimitStores(sequelize: Sequelize, namespace = ''): RateLimitStores {
  return (name) => new PostgresRateLimitStore(sequelize, `${namespace}${name}:`);
}

/** Drops rows whose window ended more than a day ago (the longest window is far shorter). */
export async function pruneRateLimitHits(sequelize: Sequelize): Promise<number> {
  const [, meta] = await sequelize.query(`DELETE FROM rate_limit_hits WHERE reset_at < now() - interval '1 day'`);
  return (meta as { rowCount?: number })?.rowCount ?? 0;
}

/** Sign-in and account-mail limits, and where their counts are kept (memory when `store` is not given). */
export interface AccountLimits {
  perAccount: number;
  perAddress: number;
  windowMs: number;
  store?: RateLimitStores;
}
