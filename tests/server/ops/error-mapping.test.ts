/**
 * Requests that used to end in 500 answer 400 in the usual shape: an undecodable path, a body whose
 * Content-Encoding is unknown or does not match, a multipart file name with a NUL. A database outage
 * answers 503 with Retry-After and a message to try again shortly.
 */
import { gzipSync } from 'node:zlib';
import { Sequelize } from 'sequelize';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClubFixture, testApp, type ClubFixture } from '../../support/app';
import { freePort } from '../../support/process';
import { clipRowCount, createSession, useTestStorage, type TestStorage } from '../clips/helpers';

let fx: ClubFixture;
let store: TestStorage;

beforeAll(async () => {
  store = await useTestStorage();
  fx = await createClubFixture();
});

afterAll(async () => {
  await store.remove();
});

describe('undecodable input answers 400', () => {
  it('answers 400 BAD_REQUEST when a path holds a byte that is not UTF-8 (%c0)', async () => {
    const app = testApp();
    for (const path of ['/%c0', '/api/v1/clubs/%c0/overview', '/signin/%c0%af']) {
      const res = await request(app).get(path);
      expect(res.status, path).toBe(400);
      expect(res.body.error).toEqual({
        code: 'BAD_REQUEST',
        message: 'The address holds characters that cannot be decoded (a stray % sign?). Check the link and try again.',
      });
    }
  });

  it('answers 400 BAD_REQUEST when the Content-Encoding is unknown', async () => {
    const res = await request(testApp()).post('/api/v1/auth/signin').set('Content-Type', 'application/json').set('Content-Encoding', 'x-arcwright-squeeze').send('{}');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('BAD_REQUEST');
    expect(res.body.error.message).toMatch(/Content-Encoding this server does not read/);
  });

  it('answers 400 BAD_REQUEST when the body does not match its gzip Content-Encoding', async () => {
    const res = await request(testApp()).post('/api/v1/auth/signin').set('Content-Type', 'application/json').set('Content-Encoding', 'gzip').send('{"email":"a@b.example"}');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/could not be decompressed/);
  });

  it('still reads a body that is gzip-compressed as it says', async () => {
    const res = await request(testApp())
      .post('/api/v1/auth/signin')
      .set('Content-Type', 'application/json')
      .set('Content-Encoding', 'gzip')
      // Sent as the bytes given: superagent would otherwise serialise the Buffer as JSON.
      .serialize((body: unknown) => body as string)
      .send(gzipSync(JSON.stringify({ email: 'a@b.example', password: 'x' })));
    // Read and parsed: refused for want of a CSRF token, not for its encoding.
    expect(res.body.error.code).toBe('CSRF_INVALID');
  });

  it('answers 400 BAD_REQUEST and keeps nothing when a multipart file name holds a NUL', async () => {
    const sessionId = await createSession(fx.coach, fx.clubId);
    const before = await clipRowCount(fx.clubId);
    const url = `/api/v1/clubs/${fx.clubId}/sessions/${sessionId}/clips`;
    const raw = await fx.coach.agent.post(url).set('X-CSRF-Token', fx.coach.csrfToken!).field('captureFps', '120').attach('frames', Buffer.from('abc'), 'a\u0000b.png');
    expect(raw.status).toBe(400);
    expect(raw.body.error.code).toBe('BAD_REQUEST');
    expect(raw.body.error.message).toMatch(/file name/);
    // The extended form (filename*=) decodes to a NUL: refused by the name check.
    const boundary = 'arcwright-test-boundary';
    const body = Buffer.concat([
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="captureFps"\r\n\r\n120\r\n`),
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="frames"; filename*=UTF-8''a%00b.png\r\nContent-Type: image/png\r\n\r\nabc\r\n`),
      Buffer.from(`--${boundary}--\r\n`),
    ]);
    const extended = await fx.coach.agent.post(url).set('X-CSRF-Token', fx.coach.csrfToken!).set('Content-Type', `multipart/form-data; boundary=${boundary}`).send(body);
    expect(extended.status).toBe(400);
    expect(extended.body.error).toEqual({
      code: 'BAD_REQUEST',
      message: 'A file name holds a control character (such as NUL). Rename the file and upload it again.',
      fields: { file: 'Rename the file: letters, digits, spaces and punctuation only.' },
    });
    expect(await clipRowCount(fx.clubId)).toEqual(before);
    expect(await store.files()).toEqual([]);
  });
});

describe('a database outage answers 503', () => {
  it('answers 503 with Retry-After and "try again shortly" when the database refuses connections', async () => {
    const deadPort = await freePort();
    const unreachable = new Sequelize('arcwright', 'nobody', 'nothing', { dialect: 'mariadb', host: '127.0.0.1', port: deadPort, logging: false });
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/database', async (_req, res) => {
          await unreachable.query('SELECT 1');
          res.json({ data: 'unreachable' });
        });
      },
    });
    try {
      const res = await request(app).get('/api/v1/test-only/database');
      expect(res.status).toBe(503);
      expect(res.headers['retry-after']).toBe('5');
      expect(res.body.error).toEqual({
        code: 'SERVICE_UNAVAILABLE',
        message: 'The database is not answering right now. Try again shortly; if it keeps happening, tell your administrator.',
      });
    } finally {
      await unreachable.close();
    }
  });

  it('answers 503 when a connection drops under a statement (driver error marked fatal)', async () => {
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/dropped', () => {
          throw Object.assign(new Error('socket has unexpectedly been closed'), { code: 'ER_SOCKET_UNEXPECTED_CLOSE', fatal: true });
        });
      },
    });
    const res = await request(app).get('/api/v1/test-only/dropped');
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('SERVICE_UNAVAILABLE');
  });

  it('keeps answering 500 for a statement that fails while the connection is fine', async () => {
    const app = testApp({
      extraApiRoutes: (api) => {
        api.get('/test-only/bad-sql', async () => {
          await fx.app.get('env');
          const { sequelize } = await import('../../../server/db');
          await sequelize.query('SELECT no_such_column FROM no_such_table');
        });
      },
    });
    const res = await request(app).get('/api/v1/test-only/bad-sql');
    expect(res.status).toBe(500);
    expect(res.body.error.code).toBe('INTERNAL');
  });
});
