import { mkdtempSync, mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterEach, describe, expect, it, onTestFinished, vi } from 'vitest';
import { ApiError } from '../../server/http/errors';
import { ApiClient, testApp } from '../support/app';
import { captureLogs } from '../support/logs';

describe('errors: one JSON shape', () => {
  afterEach(() => {
    vi.restoreAllMocks();
  });

  it('answers 404 NOT_FOUND as JSON when an API route is unknown', async () => {
    const res = await request(testApp()).get('/api/v1/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expect(res.body.error.code).toBe('NOT_FOUND');
    expect(res.body.error.message).toContain('GET /api/v1/no-such-thing');
  });

  it('answers 404 JSON for unknown /api paths outside v1 and for unknown methods', async () => {
    const app = testApp();
    expect((await request(app).get('/api/v2/health')).body.error.code).toBe('NOT_FOUND');
    const client = new ApiClient(app);
    const res = await client.delete('/api/v1/auth/me');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
  });

  it('answers 400 MALFORMED_JSON with advice when the body is not JSON', async () => {
    const res = await request(testApp()).post('/api/v1/auth/signin').set('Content-Type', 'application/json').send('{"email": "a@b.example",');
    expect(res.status).toBe(400);
    expect(res.body.error).toEqual({
      code: 'MALFORMED_JSON',
      message: 'The request body is not valid JSON. Send a JSON object with the header Content-Type: application/json.',
    });
  });

  it('answers 413 PAYLOAD_TOO_LARGE when a JSON body exceeds 1 MB', async () => {
    const res = await request(testApp())
      .post('/api/v1/auth/signin')
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ email: 'a@b.example', password: 'x'.repeat(1_100_000) }));
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('PAYLOAD_TOO_LARGE');
  });

  it('answers 500 INTERNAL with a reference and no stack when a route throws', async () => {
    const logs = captureLogs('error');
    onTestFinished(() => logs.restore());
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/boom', () => {
          throw new Error('secret internal detail at /srv/arcwright');
        });
      },
    });
    const res = await request(app).get('/api/v1/test-only/boom');
    expect(res.status).toBe(500);
    const requestId = res.headers['x-request-id'] as string;
    expect(requestId).toMatch(/^[0-9a-f-]{36}$/);
    expect(res.body).toEqual({
      error: {
        code: 'INTERNAL',
        message: `Something went wrong on our side (reference ${requestId}). Try again in a moment; if it keeps happening, give this reference to your administrator.`,
      },
    });
    expect(JSON.stringify(res.body)).not.toMatch(/secret internal detail|at .*\.ts|Error:/);
    // The stack goes to the server log, in one line's field, tagged with the same request id.
    const failure = logs.lines.find((l) => l.requestId === requestId && typeof l.stack === 'string');
    expect(failure?.stack).toContain('secret internal detail');
    expect(logs.raw.every((line) => !line.includes('\n'))).toBe(true);
  });

  it('answers with the ApiError code and its status when a route throws one', async () => {
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/unprocessable', () => {
          throw new ApiError('UNPROCESSABLE', 'The track has too few points; mark at least five.', { points: 'Mark at least five points.' });
        });
      },
    });
    const res = await request(app).get('/api/v1/test-only/unprocessable');
    expect(res.status).toBe(422);
    expect(res.body.error).toEqual({
      code: 'UNPROCESSABLE',
      message: 'The track has too few points; mark at least five.',
      fields: { points: 'Mark at least five points.' },
    });
  });

  it('answers 400 VALIDATION_FAILED naming unknown fields when a body has extra keys', async () => {
    const client = new ApiClient(testApp());
    const res = await client.post('/api/v1/auth/signup', { email: 'x@y.example' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.message).toMatch(/^Check these fields: /);
  });
});

describe('health and security headers', () => {
  it('reports the app and the database as ok', async () => {
    const res = await request(testApp()).get('/api/v1/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ data: { status: 'ok', db: 'ok', storage: 'ok', ffmpeg: 'ok' } });
  });

  it('sends a CSP without external origins except the sign-in provider for form posts', async () => {
    const res = await request(testApp()).get('/api/v1/health');
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("style-src 'self' 'unsafe-inline'");
    expect(csp).toMatch(/form-action 'self'( http:\/\/127\.0\.0\.1:\d+)?/);
    const origins = csp.match(/https?:\/\/[^\s;]+/g) ?? [];
    expect(origins.every((o) => o.startsWith('http://127.0.0.1:'))).toBe(true);
    expect(res.headers['x-powered-by']).toBeUndefined();
    expect(res.headers['x-content-type-options']).toBe('nosniff');
  });
});

describe('client hosting', () => {
  function builtClient(): string {
    const dir = mkdtempSync(join(tmpdir(), 'arcwright-client-'));
    mkdirSync(join(dir, 'assets'));
    writeFileSync(join(dir, 'index.html'), '<!doctype html><title>Arcwright</title><div id="app"></div>');
    writeFileSync(join(dir, 'assets', 'app-1234.js'), 'console.log(1)');
    // Large enough (over 1 KiB) for the server to compress.
    writeFileSync(join(dir, 'assets', 'index-5678.js'), 'export const figures = [' + '"carry", "apex", '.repeat(200) + '];');
    writeFileSync(join(dir, 'assets', 'index-5678.css'), '.report { margin: 0 auto; }\n'.repeat(100));
    writeFileSync(join(dir, 'assets', 'frame-9abc.jpg'), Buffer.alloc(4096, 0xff));
    return dir;
  }

  it('serves index.html for client routes when the path is not an API path', async () => {
    const app = testApp({ clientDir: builtClient() });
    for (const path of ['/', '/signin', '/clubs/3/overview']) {
      const res = await request(app).get(path);
      expect(res.status).toBe(200);
      expect(res.text).toContain('<div id="app"></div>');
    }
  });

  it('serves hashed assets with a long cache lifetime', async () => {
    const res = await request(testApp({ clientDir: builtClient() })).get('/assets/app-1234.js');
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toContain('immutable');
  });

  it('sends index.html with no-cache so that a new build is picked up at once', async () => {
    const res = await request(testApp({ clientDir: builtClient() })).get('/sessions');
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toBe('no-cache');
  });

  it('compresses scripts and styles with brotli or gzip as the browser accepts', async () => {
    const app = testApp({ clientDir: builtClient() });
    const br = await request(app).get('/assets/index-5678.js').set('Accept-Encoding', 'br');
    expect(br.status).toBe(200);
    expect(br.headers['content-encoding']).toBe('br');
    expect(br.headers['vary']).toMatch(/Accept-Encoding/i);
    expect(br.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(br.text).toContain('"carry", "apex"');

    const gzip = await request(app).get('/assets/index-5678.css').set('Accept-Encoding', 'gzip, deflate');
    expect(gzip.headers['content-encoding']).toBe('gzip');
    expect(gzip.text).toContain('.report { margin: 0 auto; }');

    const plain = await request(app).get('/assets/index-5678.js').set('Accept-Encoding', 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
  });

  it('leaves pictures uncompressed (they are compressed already)', async () => {
    const res = await request(testApp({ clientDir: builtClient() })).get('/assets/frame-9abc.jpg').set('Accept-Encoding', 'br, gzip');
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBeUndefined();
    expect(res.headers['cache-control']).toContain('immutable');
  });

  it('compresses JSON answers of the API over 1 KiB and leaves small ones as they are', async () => {
    const rows = Array.from({ length: 100 }, (_, i) => ({ id: i, carryM: 40 + i / 10, apexM: 12.5 }));
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/rows', (_req, res) => {
          res.json({ data: rows });
        });
      },
    });
    const big = await request(app).get('/api/v1/test-only/rows').set('Accept-Encoding', 'gzip');
    expect(big.status).toBe(200);
    expect(big.headers['content-encoding']).toBe('gzip');
    expect(big.body.data).toEqual(rows);

    const small = await request(app).get('/api/v1/no-such-thing').set('Accept-Encoding', 'gzip');
    expect(small.status).toBe(404);
    expect(small.headers['content-encoding']).toBeUndefined();
  });

  it('explains how to build the client when it is missing', async () => {
    const res = await request(testApp({ clientDir: join(tmpdir(), 'arcwright-no-client') })).get('/');
    expect(res.status).toBe(503);
    expect(res.text).toMatch(/npm run build/);
  });
});
