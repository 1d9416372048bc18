/**
 * `createApp()` wires middleware, routers, the API 404, the built client and the error handler; it never
 * listens (server/index.ts does, tests use supertest). Every API route is under `/api/v1`.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import compression from 'compression';
import express, { Router, type Express } from 'express';
import helmet from 'helmet';
import passport from 'passport';
import { configurePassport } from './auth/passport';
import { config } from './config';
import { sequelize } from './db';
import { readScopePerRequest } from './db-routing';
import { csrfProtection } from './http/csrf';
import { apiNotFound, errorHandler } from './http/error-handler';
import type { LimitOptions } from './http/rate-limit';
import { accessLog } from './http/access-log';
import { requestId } from './http/request-id';
import { sessionMiddleware } from './http/session';
import './http/types';
import { closeConnectionsWhileDraining } from './lifecycle';
import { accountRouter } from './routes/account';
import { athletesRouter } from './routes/athletes';
import { authRouter } from './routes/auth';
import { ballsRouter } from './routes/balls';
import { billingRouter, billingWebhookRouter } from './routes/billing';
import { clipUploadsRouter } from './routes/clip-uploads';
import { clipsRouter } from './routes/clips';
import { clubsRouter } from './routes/clubs';
import { devMailboxRouter } from './routes/dev-mailbox';
import { exportsRouter } from './routes/exports';
import { flightsRouter } from './routes/flights';
import { healthRouter } from './routes/health';
import { invitationLinksRouter, invitationsRouter } from './routes/invitations';
import { jobsRouter } from './routes/jobs';
import { membersRouter } from './routes/members';
import { myFlightsRouter } from './routes/my-flights';
import { notesRouter } from './routes/notes';
import { passwordResetRouter } from './routes/password-reset';
import { sessionsRouter } from './routes/sessions';
import { workloadRouter } from './routes/workload';

export interface AppOptions {
  /** Overrides of the sign-in limit (failed attempts per IP and e-mail); tests lower it. */
  signinLimit?: Partial<LimitOptions>;
  /** Overrides of the sign-in limit per IP address across all e-mails. */
  signinAddressLimit?: Partial<LimitOptions>;
  /** Overrides of the sign-up limit (per IP); tests raise it. */
  signupLimit?: Partial<LimitOptions>;
  /** Overrides of the password-reset request limit (per IP and e-mail). */
  resetLimit?: Partial<LimitOptions>;
  /** Extra API routes mounted under /api/v1 just before the API 404 (tests use it to force failures). */
  extraApiRoutes?: (api: Router) => void;
  /** Directory of the built client; defaults to config.clientDir. */
  clientDir?: string;
}

function origin(url: string): string | null {
  try {
    return new URL(url).origin;
  } catch {
    return null;
  }
}

function securityHeaders() {
  const oauthOrigin = origin(config.google.authUrl);
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        baseUri: ["'self'"],
        scriptSrc: ["'self'"],
        // PrimeVue's styled mode injects <style> elements at run time.
        styleSrc: ["'self'", "'unsafe-inline'"],
        fontSrc: ["'self'", 'data:'],
        // ECharts draws on canvas and exports data: URLs; clips and frames are shown from blob: URLs.
        imgSrc: ["'self'", 'data:', 'blob:'],
        mediaSrc: ["'self'", 'blob:'],
        workerSrc: ["'self'", 'blob:'],
        connectSrc: ["'self'"],
        objectSrc: ["'none'"],
        frameAncestors: ["'none'"],
        formAction: oauthOrigin ? ["'self'", oauthOrigin] : ["'self'"],
        ...(config.session.cookieSecure ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    // HSTS only makes sense behind HTTPS; on the plain-HTTP loopback default it would only confuse browsers.
    strictTransportSecurity: config.session.cookieSecure,
  });
}

export function createApp(options: AppOptions = {}): Express {
  configurePassport();
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy);
  app.use(requestId);
  app.use(accessLog());
  app.use(closeConnectionsWhileDraining);
  // Reads of a request that has written go to the primary when read replicas are configured.
  app.use(readScopePerRequest);
  app.use(securityHeaders());
  // Text answers (the client's JS, CSS and HTML, JSON, CSV) go out as brotli or gzip, whichever the browser
  // accepts; video, images and answers under 1 KiB go out as they are.
  app.use(compression());

  // The payment webhook reads its raw body (the signature covers the exact bytes): before express.json().
  app.use('/api/v1', billingWebhookRouter);

  const api = Router();
  // Health answers before the session so that probes create no session rows.
  api.use(healthRouter);
  api.use(express.json({ limit: '1mb' }));
  api.use(sessionMiddleware(sequelize));
  api.use(passport.initialize());
  api.use(passport.session());
  api.use(csrfProtection);

  api.use(
    authRouter({
      signinLimit: { windowMs: config.rateLimit.signinWindowMs, max: config.rateLimit.signinMax, ...options.signinLimit },
      signinAddressLimit: { windowMs: config.rateLimit.signinWindowMs, max: config.rateLimit.signinAddressMax, ...options.signinAddressLimit },
      signupLimit: { windowMs: config.rateLimit.signupWindowMs, max: config.rateLimit.signupMax, ...options.signupLimit },
    }),
  );
  api.use(passwordResetRouter({ windowMs: config.rateLimit.resetWindowMs, max: config.rateLimit.resetMax, ...options.resetLimit }));
  api.use(accountRouter);
  api.use(clubsRouter);
  api.use(membersRouter);
  api.use(athletesRouter);
  api.use(ballsRouter);
  api.use(billingRouter);
  api.use(invitationsRouter);
  api.use(invitationLinksRouter);
  api.use(sessionsRouter);
  api.use(clipsRouter);
  api.use(clipUploadsRouter);
  api.use(exportsRouter);
  api.use(flightsRouter);
  api.use(jobsRouter);
  api.use(workloadRouter);
  api.use(notesRouter);
  api.use(myFlightsRouter);

  options.extraApiRoutes?.(api);
  api.use(apiNotFound);
  app.use('/api/v1', api);
  app.use('/api', apiNotFound);

  // The development mailbox exists only beside the fakes; otherwise /dev answers 404 rather than the client.
  if (config.fakes.enabled) app.use('/dev', devMailboxRouter);
  app.use('/dev', (_req, res) => {
    res.status(404).type('text/plain').send('Not found. The development mailbox exists only while the local fakes are on (FAKES=1).');
  });

  const clientDir = options.clientDir ?? config.clientDir;
  app.use(
    express.static(clientDir, {
      index: false,
      setHeaders: (res, path) => {
        // Vite puts content-hashed files under assets/: they never change under one name.
        if (/[\\/]assets[\\/]/.test(path)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
      },
    }),
  );
  app.get('/{*splat}', (_req, res) => {
    const index = join(clientDir, 'index.html');
    if (!existsSync(index)) {
      res.status(503).type('text/plain').send('The web client is not built yet. Run `npm run build` (or `npm start`), then reload.');
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(index);
  });
  app.use(apiNotFound);
  app.use(errorHandler);
  return app;
}
