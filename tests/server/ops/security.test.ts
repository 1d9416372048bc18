/**
 * Sign-in spraying capped per address, frame sets decoded and their size capped before anything is kept,
 * the OAuth stand-in kept off production and off the network, and password hashes at the configured
 * scrypt cost, upgraded at the next sign-in.
 */
import { execFileSync } from 'node:child_process';
import { randomBytes, scryptSync } from 'node:crypto';
import { copyFile, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword, needsRehash, verifyPassword } from '../../../server/auth/passwords';
import { config } from '../../../server/config';
import { startOAuthFake } from '../../../server/fakes/oauth';
import { unsafeProductionSettings } from '../../../server/startup-checks';
import { makeBadFiles, type BadFiles } from '../../../server/video/synth';
import { ApiClient, createClubFixture, signUp, TEST_PASSWORD, testApp, User, type ClubFixture } from '../../support/app';
import { ROOT } from '../../support/db';
import { clipRowCount, createSession, upload, useTestStorage, type TestStorage } from '../clips/helpers';

let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let bad: BadFiles;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-security-'));
  [fx, bad] = await Promise.all([createClubFixture(), makeBadFiles(join(dir, 'bad'))]);
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

describe('sign-in limit per address', () => {
  it('refuses the next attempt from an address that failed on five accounts, as one account is refused', async () => {
    const app = testApp({ signinLimit: { max: 3, windowMs: 60_000 }, signinAddressLimit: { max: 5, windowMs: 60_000 } });
    const accounts = await Promise.all(Array.from({ length: 6 }, () => signUp(app)));
    const client = new ApiClient(app);
    for (const account of accounts.slice(0, 5)) {
      expect((await client.post('/api/v1/auth/signin', { email: account.email, password: 'Wrong-password-1' })).status).toBe(401);
    }
    // A sixth account, with its right password: the address is capped, whatever the e-mail.
    const refused = await client.post('/api/v1/auth/signin', { email: accounts[5]!.email, password: TEST_PASSWORD });
    expect(refused.status).toBe(429);
    expect(refused.body.error).toEqual({
      code: 'RATE_LIMITED',
      message: 'Too many failed sign-ins from this address. Wait 1 minute and try again, or ask a club admin for help.',
    });
  });

  it('does not count successful sign-ins from the address', async () => {
    const app = testApp({ signinAddressLimit: { max: 2, windowMs: 60_000 } });
    const account = await signUp(app);
    const client = new ApiClient(app);
    for (let i = 0; i < 4; i++) expect((await client.post('/api/v1/auth/signin', { email: account.email, password: TEST_PASSWORD })).status).toBe(200);
  });
});

describe('frame-set uploads are decoded and capped before they are kept', () => {
  async function refusedUpload(frames: string[]): Promise<{ status: number; error: { code: string; message: string } }> {
    const sessionId = await createSession(fx.coach, fx.clubId);
    const before = await clipRowCount(fx.clubId);
    const res = await upload(fx.coach, fx.clubId, sessionId, { frames, fields: { captureFps: '100' } });
    expect(await clipRowCount(fx.clubId)).toEqual(before);
    expect(await store.files()).toEqual([]);
    return { status: res.status, error: res.body.error };
  }

  it('refuses a PNG whose header claims 60000 × 60000 pixels, keeping nothing', async () => {
    const png = await readFile(bad.goodFrames[1]!);
    png.writeUInt32BE(60000, 16);
    png.writeUInt32BE(60000, 20);
    const huge = [join(dir, 'h1.png'), join(dir, 'h2.png')];
    for (const path of huge) await writeFile(path, png);
    const { status, error } = await refusedUpload(huge);
    expect(status).toBe(422);
    expect(error.code).toBe('MEDIA_UNREADABLE');
    expect(error.message).toBe(
      'The frames are 60000×60000 pixels; this server takes frames of at most 8192 pixels a side and 40 million pixels. Export them smaller and upload them again.',
    );
  });

  it('refuses a JPEG header followed by markup, keeping nothing', async () => {
    const jpeg = await readFile(bad.mixedTypeFrames[2]!);
    // Everything up to the start of the scan (FF DA) is a valid header with a frame size; markup follows.
    const scan = jpeg.indexOf(Buffer.from([0xff, 0xda]));
    expect(scan).toBeGreaterThan(0);
    const forged = Buffer.concat([jpeg.subarray(0, scan), Buffer.from('<html><body><script>alert(1)</script></body></html>')]);
    const frames = [join(dir, 'm1.jpg'), join(dir, 'm2.jpg')];
    await writeFile(frames[0]!, forged);
    await copyFile(bad.mixedTypeFrames[2]!, frames[1]!);
    const { status, error } = await refusedUpload(frames);
    expect(status).toBe(415);
    expect(error.code).toBe('UNSUPPORTED_MEDIA');
    expect(error.message).toBe('"m1.jpg" starts like a JPEG but cannot be decoded as one: the file is damaged or not an image. Export the frame again.');
  });

  it('still keeps a good frame set', async () => {
    const sessionId = await createSession(fx.coach, fx.clubId);
    const res = await upload(fx.coach, fx.clubId, sessionId, { frames: bad.goodFrames, fields: { captureFps: '100' } });
    expect(res.status).toBe(201);
  });
});

describe('the OAuth stand-in', () => {
  it('refuses to listen beyond loopback', async () => {
    await expect(startOAuthFake({ clientId: 'c', clientSecret: 's', defaultEmail: 'x@fake.example', defaultName: 'X' }, 0, '0.0.0.0')).rejects.toThrow(
      'The OAuth stand-in serves only on loopback (asked for 0.0.0.0). Use 127.0.0.1.',
    );
  });

  it('refuses to start with NODE_ENV=production', async () => {
    const before = process.env.NODE_ENV;
    process.env.NODE_ENV = 'production';
    try {
      await expect(startOAuthFake({ clientId: 'c', clientSecret: 's', defaultEmail: 'x@fake.example', defaultName: 'X' }, 0)).rejects.toThrow(/never runs with NODE_ENV=production/);
    } finally {
      process.env.NODE_ENV = before;
    }
  });

  it('makes a production app refuse to start with the stand-in\'s URLs or the fakes on', () => {
    const production = { ...config, isProduction: true, fakes: { ...config.fakes, enabled: true }, google: { ...config.google, enabled: true } };
    const problems = unsafeProductionSettings(production);
    expect(problems).toEqual([
      'FAKES is on: the local stand-ins (OAuth, payment, mail sink) never run in production. Set FAKES=0.',
      'GOOGLE_AUTH_URL, GOOGLE_TOKEN_URL, GOOGLE_USERINFO_URL point at the local OAuth stand-in: set the real provider\'s URLs (see .env.example) or turn Google sign-in off with GOOGLE_SIGNIN=0.',
    ]);
    const real = {
      ...production,
      fakes: { ...config.fakes, enabled: false },
      google: { ...config.google, enabled: true, authUrl: 'https://accounts.example/auth', tokenUrl: 'https://accounts.example/token', userinfoUrl: 'https://accounts.example/userinfo' },
    };
    expect(unsafeProductionSettings(real)).toEqual([]);
    expect(unsafeProductionSettings({ ...production, isProduction: false })).toEqual([]);
  });

  it('stops `server/index.ts` before it touches the database in production with the stand-in configured', () => {
    let output = '';
    try {
      execFileSync(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
        cwd: ROOT,
        env: { PATH: process.env.PATH, NODE_ENV: 'production', ENV_FILE: 'none', FAKES: '0', GOOGLE_SIGNIN: '1', DB_PORT: '1' },
        stdio: 'pipe',
      });
    } catch (err) {
      output = String((err as { stdout?: Buffer }).stdout ?? '') + String((err as { stderr?: Buffer }).stderr ?? '');
      expect((err as { status?: number }).status).toBe(1);
    }
    expect(output).toContain('Refusing to start with NODE_ENV=production');
    expect(output).toContain('point at the local OAuth stand-in');
    expect(output).not.toContain('Cannot reach MariaDB');
  });
});

describe('the stand-ins runner', () => {
  it('refuses to start any stand-in with NODE_ENV=production', () => {
    let failure: { status?: number; stdout?: Buffer } = {};
    try {
      execFileSync(process.execPath, ['--import', 'tsx', 'server/fakes/run.ts'], { cwd: ROOT, env: { PATH: process.env.PATH, NODE_ENV: 'production', ENV_FILE: 'none' }, stdio: 'pipe' });
    } catch (err) {
      failure = err as typeof failure;
    }
    expect(failure.status).toBe(1);
    expect(String(failure.stdout)).toContain('The local stand-ins never run with NODE_ENV=production');
  });
});

describe('password hashes', () => {
  it('defaults to the OWASP scrypt cost N = 2^17 when nothing lowers it', () => {
    const out = execFileSync(process.execPath, ['--import', 'tsx', '--eval', "import('./server/config.ts').then((m) => console.log(m.config.passwords.scryptLogN))"], {
      cwd: ROOT,
      env: { PATH: process.env.PATH, ENV_FILE: 'none' },
    });
    expect(out.toString().trim()).toBe('17');
  });

  it('hashes at the configured cost and marks hashes of another cost for rehashing', async () => {
    const hash = await hashPassword('Correct horse 9');
    expect(hash.split('$').slice(1, 4)).toEqual([String(2 ** config.passwords.scryptLogN), '8', '1']);
    expect(needsRehash(hash)).toBe(false);
    const older = oldHash('Correct horse 9', 2 ** 10);
    expect(needsRehash(older)).toBe(true);
    expect(await verifyPassword('Correct horse 9', older)).toBe(true);
  });

  it('upgrades an older hash at the next successful sign-in, and not at a failed one', async () => {
    const app = testApp();
    const account = await signUp(app);
    const older = oldHash(TEST_PASSWORD, 2 ** 10);
    await User.update({ passwordHash: older }, { where: { id: account.userId } });
    const client = new ApiClient(app);
    expect((await client.post('/api/v1/auth/signin', { email: account.email, password: 'Wrong-password-1' })).status).toBe(401);
    expect((await User.findByPk(account.userId))!.passwordHash).toBe(older);
    expect((await client.post('/api/v1/auth/signin', { email: account.email, password: TEST_PASSWORD })).status).toBe(200);
    const upgraded = (await User.findByPk(account.userId))!.passwordHash!;
    expect(upgraded).not.toBe(older);
    expect(needsRehash(upgraded)).toBe(false);
    expect(await verifyPassword(TEST_PASSWORD, upgraded)).toBe(true);
  });
});

/** A hash in the stored format made with another cost, as an older release would have stored it. */
function oldHash(password: string, N: number): string {
  const salt = randomBytes(16);
  const key = scryptSync(password.normalize('NFKC'), salt, 64, { N, r: 8, p: 1, maxmem: 256 * N * 8 });
  return ['scrypt', N, 8, 1, salt.toString('base64'), key.toString('base64')].join('$');
}
