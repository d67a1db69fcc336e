import { Router, type RequestHandler } from 'express';
import { createAccessTokenSchema } from '../../../shared/schemas/access';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { createAccessToken, listAccessTokens, revokeAccessToken } from './access-token.service';
import { requireSession } from './bearer-auth';

/**
 * The signed-in user's personal access tokens, under `/api/access-tokens`; `passwordChecks` limits wrong current
 * passwords (shared with the password change).
 */
export function accessTokenRoutes(passwordChecks: RequestHandler) {
  const router = Router();
  router.use(requireSession);

  router.get('/', async (req, res) => {
    res.json({ accessTokens: await listAccessTokens(currentUser(req).id) });
  });

  router.post('/', passwordChecks, async (req, res) => {
    const input = parseInput(createAccessTokenSchema, req.body);
    res.status(201).json(await createAccessToken(currentUser(req), input));
  });

  router.delete('/:tokenId', async (req, res) => {
    const tokenId = parseId(req.params.tokenId, 'tokenId');
    res.json({ accessToken: await revokeAccessToken(currentUser(req).id, tokenId) });
  });

  return router;
}
