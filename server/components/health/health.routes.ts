import { Router } from 'express';
import type { AppContext } from '../../context';
import type { InputPool } from '../../lib/input-pool';
import { healthChecker } from './health.service';

/** `GET /api/health` (no sign-in): 200 with the state of the database and the queues, 503 with it when not ok. */
export function healthRoutes(ctx: AppContext, inputs: InputPool) {
  const router = Router();
  const check = healthChecker({
    sequelize: ctx.sequelize,
    timeoutMs: ctx.config.HEALTH_DB_TIMEOUT_MS,
    runQueue: () => ctx.runQueue.state(),
    inputs: () => inputs.state(),
  });
  router.get('/health', async (_req, res) => {
    const health = await check();
    res.set('Cache-Control', 'no-store').status(health.ok ? 200 : 503).json(health);
  });
  return router;
}
