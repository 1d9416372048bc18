/**
 * A local OAuth 2.0 authorization server standing in for Google sign-in in development and tests
 * (RFC 6749 authorization-code grant; userinfo shaped like OpenID Connect's). It knows no real accounts:
 * it approves whatever invented person the caller names.
 *
 * - `GET /authorize?response_type=code&client_id&redirect_uri&state[&login_hint=<email>&name=<name>]`:
 *   with `login_hint` it approves at once (tests drive it this way); otherwise it shows a small page with a
 *   pre-filled invented user and a Continue button.
 * - `POST /token` (form or JSON; client credentials in the body or Basic auth) → `{ access_token, ... }`.
 * - `GET /userinfo?access_token=` (or `Authorization: Bearer`) → `{ sub, email, email_verified, name, ... }`.
 */
import { createHash, randomBytes } from 'node:crypto';
import type { Server } from 'node:http';
import express, { type Express, type Request, type Response } from 'express';
import { escapeHtml } from '../http/html';

export interface OAuthFakeOptions {
  clientId: string;
  clientSecret: string;
  defaultEmail: string;
  defaultName: string;
}

interface FakeUser {
  email: string;
  name: string;
}

interface Grant {
  user: FakeUser;
  clientId: string;
  redirectUri: string;
  expiresAt: number;
}

const CODE_TTL_MS = 5 * 60 * 1000;
const TOKEN_TTL_S = 3600;

/** A stable, Google-like numeric subject id for an e-mail. */
export function fakeSubject(email: string): string {
  const digest = createHash('sha256').update(email.trim().toLowerCase()).digest();
  return `1${digest.readBigUInt64BE(0).toString().padStart(20, '0')}`;
}

function param(req: Request, name: string): string {
  const value = (req.query as Record<string, unknown>)[name];
  return typeof value === 'string' ? value : '';
}

function oauthError(res: Response, status: number, error: string, description: string): void {
  res.status(status).json({ error, error_description: description });
}

export function createOAuthFake(options: OAuthFakeOptions): Express {
  const codes = new Map<string, Grant>();
  const tokens = new Map<string, { user: FakeUser; expiresAt: number }>();
  const app = express();
  app.disable('x-powered-by');

  function checkAuthorizeRequest(req: Request, res: Response): boolean {
    if (param(req, 'response_type') !== 'code') {
      res.status(400).type('text/plain').send('This stand-in supports only response_type=code.');
      return false;
    }
    if (param(req, 'client_id') !== options.clientId) {
      res.status(400).type('text/plain').send('Unknown client_id: set GOOGLE_CLIENT_ID to the value the fake was started with.');
      return false;
    }
    if (!/^https?:\/\//.test(param(req, 'redirect_uri'))) {
      res.status(400).type('text/plain').send('redirect_uri is missing or not an http(s) URL.');
      return false;
    }
    return true;
  }

  function approve(req: Request, res: Response, user: FakeUser): void {
    const code = randomBytes(16).toString('hex');
    codes.set(code, { user, clientId: param(req, 'client_id'), redirectUri: param(req, 'redirect_uri'), expiresAt: Date.now() + CODE_TTL_MS });
    const target = new URL(param(req, 'redirect_uri'));
    target.searchParams.set('code', code);
    if (param(req, 'state')) target.searchParams.set('state', param(req, 'state'));
    res.redirect(302, target.toString());
  }

  app.get('/health', (_req, res) => {
    res.json({ status: 'ok' });
  });

  app.get('/authorize', (req, res) => {
    if (!checkAuthorizeRequest(req, res)) return;
    const hint = param(req, 'login_hint').trim().toLowerCase();
    if (hint) {
      approve(req, res, { email: hint, name: param(req, 'name') || hint.split('@')[0] });
      return;
    }
    const hidden = ['response_type', 'client_id', 'redirect_uri', 'state', 'scope']
      .map((name) => `<input type="hidden" name="${name}" value="${escapeHtml(param(req, name))}">`)
      .join('');
    res.type('html').send(`<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Local sign-in stand-in</title>
<style>body{font-family:system-ui,sans-serif;background:#F7F5F0;color:#1F2933;display:grid;place-items:center;min-height:100vh;margin:0}
form{background:#fff;padding:2rem;border-radius:8px;box-shadow:0 1px 4px #0002;display:grid;gap:.75rem;width:22rem}
label{display:grid;gap:.25rem;font-size:.9rem}input{padding:.5rem;font:inherit}button{padding:.6rem;background:#0F766E;color:#fff;border:0;border-radius:4px;font:inherit;cursor:pointer}
p{font-size:.85rem;color:#64748B;margin:0}</style></head>
<body><form method="get" action="/authorize/approve" aria-label="Local sign-in stand-in">
<h1 style="font-size:1.2rem;margin:0">Local sign-in stand-in</h1>
<p>This page replaces Google sign-in on this machine. No real account is used: continue as the invented person below, or change the details.</p>
${hidden}
<label>E-mail <input name="email" type="email" required value="${escapeHtml(options.defaultEmail)}"></label>
<label>Name <input name="name" required value="${escapeHtml(options.defaultName)}"></label>
<button type="submit">Continue</button>
</form></body></html>`);
  });

  app.get('/authorize/approve', (req, res) => {
    if (!checkAuthorizeRequest(req, res)) return;
    const email = param(req, 'email').trim().toLowerCase();
    if (!/^[^@\s]+@[^@\s]+$/.test(email)) {
      res.status(400).type('text/plain').send('Enter an e-mail address such as someone@club.example.');
      return;
    }
    approve(req, res, { email, name: param(req, 'name').trim() || email.split('@')[0] });
  });

  app.post('/token', express.urlencoded({ extended: false }), express.json(), (req, res) => {
    const body = (req.body ?? {}) as Record<string, string | undefined>;
    let clientId = body.client_id;
    let clientSecret = body.client_secret;
    const basic = /^Basic (.+)$/.exec(req.headers.authorization ?? '');
    if (basic) {
      const [id, secret] = Buffer.from(basic[1], 'base64').toString('utf8').split(':');
      clientId = decodeURIComponent(id ?? '');
      clientSecret = decodeURIComponent(secret ?? '');
    }
    if (clientId !== options.clientId || clientSecret !== options.clientSecret) {
      oauthError(res, 401, 'invalid_client', 'Client id or secret do not match GOOGLE_CLIENT_ID / GOOGLE_CLIENT_SECRET.');
      return;
    }
    if (body.grant_type !== 'authorization_code') {
      oauthError(res, 400, 'unsupported_grant_type', 'Only authorization_code is supported.');
      return;
    }
    const grant = body.code ? codes.get(body.code) : undefined;
    if (body.code) codes.delete(body.code);
    if (!grant || grant.expiresAt < Date.now() || grant.clientId !== clientId) {
      oauthError(res, 400, 'invalid_grant', 'The code is unknown, used or expired.');
      return;
    }
    if (body.redirect_uri !== undefined && body.redirect_uri !== grant.redirectUri) {
      oauthError(res, 400, 'invalid_grant', 'redirect_uri differs from the one of the authorization request.');
      return;
    }
    const accessToken = randomBytes(24).toString('hex');
    tokens.set(accessToken, { user: grant.user, expiresAt: Date.now() + TOKEN_TTL_S * 1000 });
    res.json({ access_token: accessToken, token_type: 'Bearer', expires_in: TOKEN_TTL_S, scope: 'openid profile email' });
  });

  app.get('/userinfo', (req, res) => {
    const bearer = /^Bearer (.+)$/.exec(req.headers.authorization ?? '');
    const token = param(req, 'access_token') || bearer?.[1] || '';
    const entry = tokens.get(token);
    if (!entry || entry.expiresAt < Date.now()) {
      oauthError(res, 401, 'invalid_token', 'The access token is unknown or expired.');
      return;
    }
    const [given, ...rest] = entry.user.name.split(' ');
    res.json({
      sub: fakeSubject(entry.user.email),
      email: entry.user.email,
      email_verified: true,
      name: entry.user.name,
      given_name: given,
      family_name: rest.join(' ') || undefined,
    });
  });

  return app;
}

/** Starts the fake on 127.0.0.1:port; resolves once it listens. */
export function startOAuthFake(options: OAuthFakeOptions, port: number, host = '127.0.0.1'): Promise<Server> {
  if (!['127.0.0.1', '::1', 'localhost'].includes(host)) {
    return Promise.reject(new Error(`The OAuth stand-in serves only on loopback (asked for ${host}). Use 127.0.0.1.`));
  }
  if (process.env.NODE_ENV === 'production') {
    return Promise.reject(new Error('The OAuth stand-in never runs with NODE_ENV=production. Configure the real provider (GOOGLE_* in .env.example).'));
  }
  return new Promise((resolve, reject) => {
    const server = createOAuthFake(options).listen(port, host);
    server.once('listening', () => resolve(server));
    server.once('error', (err: NodeJS.ErrnoException) =>
      reject(err.code === 'EADDRINUSE' ? new Error(`Port ${port} is in use: stop the other process or set OAUTH_FAKE_PORT.`) : err),
    );
  });
}
