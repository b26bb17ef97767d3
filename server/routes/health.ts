import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { policy } from '../policies';

/** GET /api/health: the server's and the database's state, no session needed. */
export function healthRouter(sequelize: Sequelize): Router {
  const router = Router();
  router.get('/health', policy.public(), async (_req, res) => {
    const started = Date.now();
    let database: 'ok' | 'unreachable' = 'ok';
    try {
      await sequelize.query('SELECT 1');
    } catch {
      database = 'unreachable';
    }
    res.status(database === 'ok' ? 200 : 503).json({
      server: 'ok',
      database,
      checkedInMs: Date.now() - started,
      uptimeSeconds: Math.round(process.uptime()),
    });
  });
  return router;
}
