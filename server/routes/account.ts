/** The signed-in user's own account settings. */
import { Router } from 'express';
import { accountUpdateSchema } from '../../shared/schemas/account';
import { requireUser } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { updateAccount } from '../services/account';

export const accountRouter = Router();

/** Changes the user's display units (`club`, `metric` or `imperial`); answers with the same body as `GET /auth/me`. */
accountRouter.patch('/account', requireUser, validate(accountUpdateSchema), async (req, res) => {
  res.json({ data: await updateAccount((req.user as Express.User).id, req.body) });
});
