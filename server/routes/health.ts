import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { policy } from '../policies';
import { checkHealth } from '../services/health';

/** GET /api/health: the server's and the database's state, no session needed. */
export function healthRouter(sequelize: Sequelize): Router {
  const router = Router();
  router.get('/health', policy.public(), async (_req, res) => {
    const report = await checkHealth(sequelize);
    res.status(report.database === 'ok' ? 200 : 503).json(report);
  });
  return router;
}
