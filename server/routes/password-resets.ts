import { Router } from 'express';
import { PasswordReset, PasswordResetPreview, PasswordResetToken } from '../../src/contracts/session';
import { open } from '../middleware/auth';
import { previewReset, resetPassword } from '../services/passwords';
import type { AppContext } from '../context';

/** Open: the person has lost their password; the link's token (in the body, kept out of logs) is the key. */
export function passwordResetsRouter(ctx: AppContext): Router {
  const router = Router();
  router.post('/preview', open, async (req, res) => {
    res.json(PasswordResetPreview.parse(await previewReset(ctx, PasswordResetToken.parse(req.body).token)));
  });
  router.post('/', open, async (req, res) => {
    res.status(201).json(await resetPassword(ctx, PasswordReset.parse(req.body)));
  });
  return router;
}
