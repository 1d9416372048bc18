import { Router } from 'express';
import {
  PASSWORD_RESET_REQUESTED,
  passwordResetRequestSchema,
  passwordResetSchema,
} from '../../shared/schemas/password-reset';
import { resetLimiter, type LimitOptions } from '../http/rate-limit';
import { publicRoute } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { checkPasswordReset, requestPasswordResetInBackground, resetPassword } from '../services/password-reset';

/** Password reset by e-mail: the request, the link check, and setting the new password. */
export function passwordResetRouter(limit: LimitOptions): Router {
  const router = Router();

  // The same answer, at once, whether or not the address has an account.
  router.post('/auth/password-reset', publicRoute, validate(passwordResetRequestSchema), resetLimiter(limit), (req, res) => {
    requestPasswordResetInBackground(req.body.email, req.requestId);
    res.status(202).json({ data: { message: PASSWORD_RESET_REQUESTED } });
  });

  router.get('/auth/password-reset/:token', publicRoute, async (req, res) => {
    res.json({ data: await checkPasswordReset(String(req.params.token)) });
  });

  router.post('/auth/password-reset/:token', publicRoute, validate(passwordResetSchema), async (req, res) => {
    await resetPassword(String(req.params.token), req.body.password, req.user ? req.sessionID : undefined);
    res.json({ data: { message: 'Your password is changed and every other session is signed out. Sign in with the new password.' } });
  });

  return router;
}
