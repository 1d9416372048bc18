/**
 * A small HTTP client for the fault and load benches: keeps the session cookie, fetches and sends the
 * CSRF token as the browser client does, and times every request by route name.
 */
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';

export interface Answer {
  status: number;
  body: { data?: unknown; error?: { code: string; message: string } } | null;
  ms: number;
}

export class BenchClient {
  private cookie = '';
  private csrf: string | null = null;
  private pendingCsrf: Promise<void> | null = null;

  constructor(
    readonly base: string,
    private readonly timings?: Map<string, number[]>,
  ) {}

  private async send(method: string, path: string, route: string, body?: string | FormData, type?: string): Promise<Answer> {
    const headers: Record<string, string> = {};
    if (method !== 'GET') {
      if (this.csrf === null) await this.refreshCsrf();
      headers['x-csrf-token'] = this.csrf ?? '';
    }
    if (this.cookie) headers.cookie = this.cookie;
    if (type) headers['content-type'] = type;
    const started = performance.now();
    const res = await fetch(`${this.base}${path}`, { method, headers, body });
    const text = await res.text();
    const ms = performance.now() - started;
    const setCookie = res.headers.get('set-cookie');
    if (setCookie) this.cookie = setCookie.split(';')[0]!;
    if (this.timings) {
      const list = this.timings.get(route);
      if (list) list.push(ms);
      else this.timings.set(route, [ms]);
    }
    let parsed: Answer['body'] = null;
    try {
      parsed = text ? (JSON.parse(text) as Answer['body']) : null;
    } catch {
      parsed = null;
    }
    if (path.startsWith('/api/v1/auth/sign') && res.status < 300) this.csrf = null;
    return { status: res.status, body: parsed, ms };
  }

  /** One fetch of the token at a time: concurrent requests of one client share its session. */
  refreshCsrf(): Promise<void> {
    this.pendingCsrf ??= this.send('GET', '/api/v1/auth/csrf', 'GET /auth/csrf')
      .then((res) => {
        this.csrf = (res.body?.data as { csrfToken?: string } | undefined)?.csrfToken ?? null;
      })
      .finally(() => {
        this.pendingCsrf = null;
      });
    return this.pendingCsrf;
  }

  get(path: string, route = `GET ${path}`): Promise<Answer> {
    return this.send('GET', path, route);
  }

  json(method: 'POST' | 'PUT' | 'PATCH' | 'DELETE', path: string, value: unknown, route = `${method} ${path}`): Promise<Answer> {
    return this.send(method, path, route, JSON.stringify(value), 'application/json');
  }

  async uploadVideo(path: string, file: string, route = `POST ${path}`): Promise<Answer> {
    const form = new FormData();
    form.append('video', new Blob([await readFile(file)], { type: 'video/mp4' }), basename(file));
    return this.send('POST', path, route, form);
  }
}

/** Signs up a new coach-admin with a club of their own; returns the client and the club id. */
export async function signUpClub(base: string, email: string, password: string, timings?: Map<string, number[]>): Promise<{ client: BenchClient; clubId: number }> {
  const client = new BenchClient(base, timings);
  const res = await client.json('POST', '/api/v1/auth/signup', { email, password, displayName: 'Bench Coach', clubName: 'Bench Vale Athletics' }, 'POST /auth/signup');
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`);
  const me = res.body?.data as { memberships: { clubId: number }[] };
  return { client, clubId: me.memberships[0]!.clubId };
}

/** p50 / p95 / max of a list of milliseconds. */
export function percentiles(values: number[]): { n: number; p50: number; p95: number; max: number } {
  const sorted = [...values].sort((a, b) => a - b);
  const at = (q: number) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))] ?? 0;
  return { n: sorted.length, p50: at(0.5), p95: at(0.95), max: sorted[sorted.length - 1] ?? 0 };
}
