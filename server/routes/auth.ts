/**
 * Sign-up, sign-in (password and Google), sign-out, the CSRF token and the signed-in user.
 * The session id is regenerated at every sign-in and sign-out (passport does it in req.login/req.logout),
 * so the client fetches a fresh CSRF token afterwards.
 */
import { Router, type Request, type Response, type NextFunction } from 'express';
import passport from 'passport';
import { signInSchema, signUpSchema } from '../../shared/schemas/auth';
import { logIn, logOut } from '../auth/login';
import { config } from '../config';
import { log } from '../logger';
import { csrfToken } from '../http/csrf';
import { ApiError } from '../http/errors';
import { signinAddressLimiter, signinLimiter, signupLimiter, type LimitOptions } from '../http/rate-limit';
import { publicRoute, requireUser } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { loadMe, signUp } from '../services/auth';

export interface AuthRouterOptions {
  signinLimit: LimitOptions;
  /** Failed sign-ins per IP address across all e-mails. */
  signinAddressLimit: LimitOptions;
  signupLimit: LimitOptions;
}

function authenticateLocal(req: Request, res: Response): Promise<Express.User | false> {
  return new Promise((resolve, reject) => {
    const handler = passport.authenticate('local', { session: false }, (err: unknown, user: Express.User | false) =>
      err ? reject(err) : resolve(user),
    ) as (req: Request, res: Response, next: NextFunction) => void;
    handler(req, res, reject);
  });
}

async function meOrThrow(userId: number, known?: Express.User) {
  const me = await loadMe(userId, known);
  if (!me) throw new ApiError('UNAUTHENTICATED', 'Your account could not be found; sign in again.');
  return me;
}

function googleEnabled(_req: Request, _res: Response, next: NextFunction): void {
  if (!config.google.enabled) throw new ApiError('NOT_FOUND', 'Google sign-in is not enabled on this server; sign in with e-mail and password.');
  next();
}

export function authRouter(options: AuthRouterOptions): Router {
  const router = Router();

  router.get('/auth/csrf', publicRoute, (req, res) => {
    res.json({ data: { csrfToken: csrfToken(req) } });
  });

  router.post('/auth/signup', publicRoute, signupLimiter(options.signupLimit), validate(signUpSchema), async (req, res) => {
    const user = await signUp(req.body);
    await logIn(req, user);
    res.status(201).json({ data: await meOrThrow(user.id) });
  });

  router.post('/auth/signin', publicRoute, validate(signInSchema), signinAddressLimiter(options.signinAddressLimit), signinLimiter(options.signinLimit), async (req, res) => {
    const user = await authenticateLocal(req, res);
    if (!user) {
      throw new ApiError('INVALID_CREDENTIALS', 'That e-mail and password do not match an account. Check both and try again.');
    }
    await logIn(req, user);
    res.json({ data: await meOrThrow(user.id) });
  });

  router.post('/auth/signout', publicRoute, async (req, res) => {
    if (req.user) await logOut(req);
    res.status(204).end();
  });

  router.get('/auth/me', requireUser, async (req, res) => {
    const user = req.user as Express.User;
    res.json({ data: await meOrThrow(user.id, user) });
  });

  router.get('/auth/google', publicRoute, googleEnabled, passport.authenticate('google', { session: true }));

  // A refused consent, a forged or reused code or a provider outage all end on the sign-in page with a
  // short flag the client turns into a message; the reason stays in the server log.
  router.get('/auth/google/callback', publicRoute, googleEnabled, (req, res, next) => {
    const failure = `${config.publicUrl}/signin?error=google`;
    const handler = passport.authenticate('google', (err: unknown, user: Express.User | false) => {
      if (err || !user) {
        if (err) log.warn('Google sign-in failed', { requestId: req.requestId, reason: err instanceof Error ? err.message : String(err) });
        res.redirect(failure);
        return;
      }
      logIn(req, user).then(
        () => res.redirect(`${config.publicUrl}/`),
        (loginErr: unknown) => next(loginErr),
      );
    }) as (req: Request, res: Response, next: NextFunction) => void;
    handler(req, res, next);
  });

  return router;
}
