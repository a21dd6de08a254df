import { Router } from 'express';
import { grantTeachingBody, type UserSummary } from '../../shared/api.js';
import { currentUser, idParam, requireSignedIn } from '../middleware/auth.js';
import { parseBody } from '../middleware/validate.js';
import { setCanTeach, toUserSummary } from '../services/users.js';
import type { Mailer } from '../services/mail.js';

export function usersRouter({ mailer }: { mailer: Mailer }): Router {
  const router = Router();
  router.post('/:userId/can-teach', requireSignedIn, async (req, res) => {
    const userId = idParam(req, 'userId');
    const { canTeach } = parseBody(grantTeachingBody, req.body);
    const user = await setCanTeach(mailer, currentUser(req), userId, canTeach);
    const body: UserSummary = toUserSummary(user);
    res.json(body);
  });
  return router;
}
