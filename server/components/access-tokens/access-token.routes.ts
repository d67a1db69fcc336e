import { Router } from 'express';
import type { AppConfig } from '../../config';
import { createAccessTokenSchema } from '../../../shared/schemas/access';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { currentPasswordLimiter } from '../auth/current-password-limit';
import { createAccessToken, listAccessTokens, revokeAccessToken } from './access-token.service';
import { requireSession } from './bearer-auth';

/** The signed-in user's personal access tokens, under `/api/access-tokens`. */
export function accessTokenRoutes(config: AppConfig) {
  const router = Router();
  router.use(requireSession);
  const passwordChecks = currentPasswordLimiter(config);

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
