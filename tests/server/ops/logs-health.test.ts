/**
 * Structured logs (pino, pino-http access log, redaction, request ids, the worker's back-off) and the
 * health probes (liveness, readiness with its checks, 503 while draining).
 */
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterEach, beforeAll, describe, expect, it, onTestFinished } from 'vitest';
import { config } from '../../../server/config';
import { BackOff } from '../../../server/jobs/backoff';
import { beginDraining, resetDraining } from '../../../server/lifecycle';
import { log } from '../../../server/logger';
import { createClubFixture, TEST_PASSWORD, testApp, type ClubFixture } from '../../support/app';
import { captureLogs } from '../../support/logs';

let fx: ClubFixture;

beforeAll(async () => {
  fx = await createClubFixture();
});

afterEach(() => {
  resetDraining();
});

describe('access log', () => {
  it('writes one JSON line per request with route, status, duration, request id, user and club', async () => {
    const logs = captureLogs();
    onTestFinished(() => logs.restore());
    const app = testApp();
    const { ApiClient } = await import('../../support/app');
    const coach = new ApiClient(app);
    await coach.post('/api/v1/auth/signin', { email: fx.members.coach.email, password: TEST_PASSWORD }).then((r) => expect(r.status).toBe(200));
    const res = await coach.agent.get(`/api/v1/clubs/${fx.clubId}/overview?secret=abc`).set('X-Request-Id', 'probe-overview-1');
    expect(res.status).toBe(200);
    const line = logs.lines.find((l) => l.requestId === 'probe-overview-1');
    expect(line).toMatchObject({
      msg: 'request',
      level: 30,
      method: 'GET',
      route: '/api/v1/clubs/:clubId/overview',
      path: `/api/v1/clubs/${fx.clubId}/overview`,
      status: 200,
      clubId: fx.clubId,
      userId: fx.members.coach.userId,
    });
    expect(typeof line?.durationMs).toBe('number');
    // Neither the query string, the cookie, the CSRF token nor the password of the sign-in reaches the log.
    const text = logs.raw.join('\n');
    expect(text).not.toContain('secret=abc');
    expect(text).not.toContain(TEST_PASSWORD);
    expect(text).not.toMatch(/arcwright\.sid|cookie/i);
    expect(text).not.toContain(coach.csrfToken ?? 'no-token');
  });

  it('logs a failed request at error level with its status', async () => {
    const logs = captureLogs();
    onTestFinished(() => logs.restore());
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/broken', () => {
          throw new Error('broken on purpose');
        });
      },
    });
    const res = await request(app).get('/api/v1/test-only/broken');
    expect(res.status).toBe(500);
    const access = logs.lines.find((l) => l.msg === 'request failed' && l.requestId === res.headers['x-request-id']);
    expect(access).toMatchObject({ level: 50, status: 500, route: '/api/v1/test-only/broken' });
  });
});

describe('request ids', () => {
  it('returns the caller\'s X-Request-Id when it is made of safe characters', async () => {
    const res = await request(testApp()).get('/api/v1/health/live').set('X-Request-Id', 'lb-7f3a:42.x_y');
    expect(res.headers['x-request-id']).toBe('lb-7f3a:42.x_y');
  });

  it('makes a new id when the caller sends none, or one too long or with unsafe characters', async () => {
    const app = testApp();
    for (const sent of [undefined, 'has spaces in it', 'x'.repeat(129), 'line\u00e9break']) {
      let req = request(app).get('/api/v1/health/live');
      if (sent !== undefined) req = req.set('X-Request-Id', sent);
      const res = await req;
      expect(res.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
    }
  });
});

describe('redaction', () => {
  it('replaces passwords, tokens, secrets and cookies in logged details', () => {
    const logs = captureLogs('debug');
    onTestFinished(() => logs.restore());
    log.info('detail with secrets', { password: 'pw-1', token: 'tk-1', user: { password: 'pw-2', secret: 's-2' }, cookie: 'c=1', kept: 'visible' });
    const line = logs.lines.find((l) => l.msg === 'detail with secrets');
    expect(line).toMatchObject({ password: '[redacted]', token: '[redacted]', user: { password: '[redacted]', secret: '[redacted]' }, cookie: '[redacted]', kept: 'visible' });
    expect(logs.raw.join('\n')).not.toMatch(/pw-1|pw-2|tk-1|s-2|c=1/);
  });

  it('keeps an error stack inside one line', () => {
    const logs = captureLogs('debug');
    onTestFinished(() => logs.restore());
    const err = new Error('two\nlines');
    log.error('failure', { stack: err.stack });
    expect(logs.raw).toHaveLength(1);
    expect(String(logs.lines[0]!.stack)).toContain('two\nlines');
  });
});

describe('worker back-off', () => {
  it('doubles the pause up to the ceiling and logs once per step, then once on recovery', () => {
    const logs = captureLogs('debug');
    onTestFinished(() => logs.restore());
    const backOff = new BackOff(500, 'worker@test', 30_000);
    const pauses = Array.from({ length: 12 }, () => backOff.failed(new Error('connect ECONNREFUSED 127.0.0.1:3398')));
    expect(pauses).toEqual([500, 1000, 2000, 4000, 8000, 16000, 30000, 30000, 30000, 30000, 30000, 30000]);
    const steps = logs.lines.filter((l) => l.msg === 'Job worker could not claim a job; backing off');
    expect(steps.map((l) => l.retryInMs)).toEqual([500, 1000, 2000, 4000, 8000, 16000, 30000]);
    backOff.succeeded();
    backOff.succeeded();
    expect(logs.lines.filter((l) => l.msg === 'Job worker claims again after failures')).toHaveLength(1);
    expect(backOff.failed(new Error('again'))).toBe(500);
  });
});

describe('health', () => {
  it('answers liveness without asking the database', async () => {
    const res = await request(testApp()).get('/api/v1/health/live');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ data: { status: 'ok' } });
  });

  it('answers readiness 503 with Retry-After while the process drains', async () => {
    beginDraining();
    const res = await request(testApp()).get('/api/v1/health');
    expect(res.status).toBe(503);
    expect(res.headers['retry-after']).toBe('5');
    expect(res.headers.connection).toBe('close');
    expect(res.body.error).toEqual({
      code: 'SERVICE_UNAVAILABLE',
      message: 'This app process is shutting down. Try again shortly; another process will answer.',
      fields: { process: 'draining' },
    });
    // Liveness still answers: the process is alive, just not taking new work.
    expect((await request(testApp()).get('/api/v1/health/live')).status).toBe(200);
  });

  it('answers readiness 503 naming ffmpeg when it is missing', async () => {
    const before = process.env.FFMPEG_PATH;
    process.env.FFMPEG_PATH = '/nonexistent/ffmpeg';
    onTestFinished(() => {
      if (before === undefined) delete process.env.FFMPEG_PATH;
      else process.env.FFMPEG_PATH = before;
    });
    const res = await request(testApp()).get('/api/v1/health');
    expect(res.status).toBe(503);
    expect(res.body.error.fields).toEqual({ ffmpeg: 'ffmpeg was not found at /nonexistent/ffmpeg. Install ffmpeg or set FFMPEG_PATH.' });
  });

  it('answers readiness 503 naming storage when it is not writable', async () => {
    const before = config.storage.dir;
    // A plain file where the folder should be: nothing can be created beneath it.
    const blocker = join(await mkdtemp(join(tmpdir(), 'arcwright-health-')), 'storage');
    await writeFile(blocker, 'not a folder');
    config.storage.dir = blocker;
    onTestFinished(() => {
      config.storage.dir = before;
    });
    const res = await request(testApp()).get('/api/v1/health');
    expect(res.status).toBe(503);
    expect(Object.keys(res.body.error.fields)).toEqual(['storage']);
    expect(res.body.error.message).toContain('is not writable. Check STORAGE_DIR');
  });
});
