import { Router } from 'express';
import type { MailListResponse } from '../../shared/api.js';
import { currentUser, requireSignedIn } from '../middleware/auth.js';
import { readCatcher } from '../services/mail.js';

/**
 * GET /api/dev/mail: the local mail catcher's messages addressed to the signed-in user
 * (newest last). Development and tests only; not mounted when MODEWRIGHT_DEV_MAIL=0.
 */
export function devMailRouter({ catcherUrl }: { catcherUrl: string }): Router {
  const router = Router();
  router.get('/mail', requireSignedIn, async (req, res) => {
    const me = currentUser(req).email.toLowerCase();
    const messages = (await readCatcher(catcherUrl)).filter((m) => m.to.some((t) => t.toLowerCase() === me));
    const body: MailListResponse = { messages };
    res.json(body);
  });
  return router;
}
