import { Router } from 'express';
import { listNotificationsQuerySchema, notificationPreferencesSchema } from '../../../shared/schemas/review';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser, requireUser } from '../auth/auth.middleware';
import { cachedList, notificationLists } from '../../db/list-caches';
import { getPreferences, listNotifications, markAllRead, markRead, setPreferences } from './notification.service';

/** The signed-in user's own notifications and e-mail choices, under `/api/notifications`. */
export function notificationRoutes() {
  const router = Router();
  router.use(requireUser);

  router.get('/', async (req, res) => {
    const query = parseInput(listNotificationsQuerySchema, req.query, 'query');
    const userId = currentUser(req).id;
    res.type('application/json').send(await cachedList(notificationLists, userId, query, () => listNotifications(userId, query.unread === 'true')));
  });

  router.post('/read-all', async (req, res) => {
    await markAllRead(currentUser(req).id);
    res.status(204).end();
  });

  router.post('/:notificationId/read', async (req, res) => {
    await markRead(currentUser(req).id, parseId(req.params.notificationId, 'notificationId'));
    res.status(204).end();
  });

  router.get('/preferences', async (req, res) => {
    res.json({ preferences: await getPreferences(currentUser(req).id) });
  });

  router.put('/preferences', async (req, res) => {
    const input = parseInput(notificationPreferencesSchema, req.body);
    res.json({ preferences: await setPreferences(currentUser(req).id, input) });
  });

  return router;
}
