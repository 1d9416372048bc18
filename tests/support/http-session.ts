/**
 * A signed-in session against a listening server over real HTTP (fetch), for tests that need a socket of their
 * own: cutting a request mid-body, or talking to the app started as a child process. Keeps the session cookie
 * and the CSRF token as the browser client does.
 */
import { request as httpRequest } from 'node:http';
import { TEST_PASSWORD } from './app';

export interface HttpSession {
  base: string;
  cookie: string;
  csrfToken: string;
  fetch(path: string, init?: { method?: string; headers?: Record<string, string>; body?: Buffer | string }): Promise<Response>;
}

export async function httpSession(base: string, email: string, password = TEST_PASSWORD): Promise<HttpSession> {
  const session: HttpSession = {
    base,
    cookie: '',
    csrfToken: '',
    async fetch(path, init = {}) {
      const headers: Record<string, string> = { ...(init.headers ?? {}) };
      if (session.cookie) headers.cookie = session.cookie;
      if ((init.method ?? 'GET') !== 'GET' && (init.method ?? 'GET') !== 'HEAD') headers['x-csrf-token'] = session.csrfToken;
      const res = await fetch(`${base}${path}`, { method: init.method ?? 'GET', headers, body: init.body });
      const set = res.headers.getSetCookie();
      if (set.length > 0) session.cookie = set.map((c) => c.split(';')[0]).join('; ');
      return res;
    },
  };
  const csrf = async () => ((await (await session.fetch('/api/v1/auth/csrf')).json()) as { data: { csrfToken: string } }).data.csrfToken;
  session.csrfToken = await csrf();
  const signin = await session.fetch('/api/v1/auth/signin', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password }) });
  if (signin.status !== 200) throw new Error(`sign-in failed: ${signin.status} ${await signin.text()}`);
  session.csrfToken = await csrf();
  return session;
}

/**
 * Starts a request with a body of `declaredBytes` and sends `chunks` one after another, awaiting `between(i)` after
 * chunk i; `cut: true` destroys the connection after the last chunk instead of ending the body. Resolves with the
 * answer's status and body, or null when the connection was cut.
 */
export function streamedRequest(
  url: string,
  options: { method: string; headers: Record<string, string>; declaredBytes: number; chunks: Buffer[]; between?: (i: number) => Promise<void>; cut?: boolean },
): Promise<{ status: number; body: string } | null> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(url, { method: options.method, headers: { ...options.headers, 'content-length': String(options.declaredBytes) } });
    req.on('response', (res) => {
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (d: string) => (body += d));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
    });
    req.on('error', (err) => (options.cut ? resolve(null) : reject(err)));
    (async () => {
      for (let i = 0; i < options.chunks.length; i++) {
        await new Promise<void>((done, fail) => req.write(options.chunks[i]!, (err) => (err ? fail(err) : done())));
        await options.between?.(i);
      }
      if (options.cut) {
        req.destroy();
        resolve(null);
      } else req.end();
    })().catch(reject);
  });
}
