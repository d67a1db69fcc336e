import { Router } from 'express';
import { createUserSchema, updateUserSchema } from '../../../shared/schemas/admin';
import { listAuditQuerySchema } from '../../../shared/schemas/audit';
import type { AppContext } from '../../context';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser, requireAdmin } from '../auth/auth.middleware';
import { listAuditEvents } from '../audit/audit.service';
import { inviteUser } from '../auth/auth.service';
import { toUserDto } from '../users/user.service';
import { listUsers, updateUser } from './admin.service';

export function adminRoutes(ctx: AppContext) {
  const router = Router();
  router.use(requireAdmin);

  router.get('/users', async (_req, res) => {
    res.json({ users: await listUsers() });
  });

  router.post('/users', async (req, res) => {
    const input = parseInput(createUserSchema, req.body);
    const user = await inviteUser(ctx, input, currentUser(req));
    res.status(201).json({ user: toUserDto(user) });
  });

  router.patch('/users/:userId', async (req, res) => {
    const input = parseInput(updateUserSchema, req.body);
    res.json({ user: await updateUser(currentUser(req), parseId(req.params.userId, 'userId'), input) });
  });

  router.get('/run-queue', async (_req, res) => {
    const counts = ctx.runQueue.counts ? await ctx.runQueue.counts().catch(() => null) : null;
    res.json({ engine: ctx.config.RUN_QUEUE, state: ctx.runQueue.state(), counts });
  });

  router.get('/audit', async (req, res) => {
    res.json(await listAuditEvents(parseInput(listAuditQuerySchema, req.query, 'query')));
  });

  return router;
}
