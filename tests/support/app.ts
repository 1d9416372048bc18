/**
 * Helpers for API tests (Supertest against `createApp()` and the real test database).
 *
 * Typical use:
 * ```ts
 * const app = testApp();
 * const club = await createClubFixture(app);          // a club with admin, coach, athlete + another club's admin
 * const res = await club.coach.get(`/api/v1/clubs/${club.clubId}/athletes`);
 * const created = await club.admin.post(`/api/v1/clubs/${club.clubId}/athletes`, { displayName: 'Test Athlete' });
 * ```
 * `ApiClient` keeps the session cookie and sends the CSRF token on POST/PUT/PATCH/DELETE, fetching a fresh one
 * after sign-in, sign-up and sign-out as the real client does. Every e-mail is unique per call, so test files
 * never collide and need no clean-up.
 */
import { randomBytes } from 'node:crypto';
import type { Express } from 'express';
import request from 'supertest';
import type { Response } from 'supertest';
import { createApp, type AppOptions } from '../../server/app';
import { hashPassword } from '../../server/auth/passwords';
import { AthleteProfile, Club, Membership, User, sequelize } from '../../server/models';
import type { Me, Role } from '../../shared/types/api';

export const TEST_PASSWORD = 'Test-password-42';

/** The app with test-friendly limits: sign-ups unlimited, sign-in limit as configured unless overridden. */
export function testApp(options: AppOptions = {}): Express {
  return createApp({ signupLimit: { max: 1_000_000 }, ...options });
}

/** A unique e-mail under the reserved `.example` domain. */
export function uniqueEmail(prefix = 'user'): string {
  return `${prefix}-${Date.now().toString(36)}-${randomBytes(4).toString('hex')}@test.example`;
}

type Method = 'get' | 'head' | 'post' | 'put' | 'patch' | 'delete';

/** A signed-in (or anonymous) browser: cookie jar plus CSRF token. */
export class ApiClient {
  readonly agent: ReturnType<typeof request.agent>;
  csrfToken: string | null = null;

  constructor(readonly app: Express) {
    this.agent = request.agent(app);
  }

  /** Fetches the session's CSRF token (creating the session). */
  async refreshCsrf(): Promise<string> {
    const res = await this.agent.get('/api/v1/auth/csrf').expect(200);
    this.csrfToken = (res.body as { data: { csrfToken: string } }).data.csrfToken;
    return this.csrfToken;
  }

  async request(method: Method, path: string, body?: unknown): Promise<Response> {
    const safe = method === 'get' || method === 'head';
    if (!safe && this.csrfToken === null) await this.refreshCsrf();
    let req = this.agent[method](path);
    if (!safe && this.csrfToken) req = req.set('X-CSRF-Token', this.csrfToken);
    if (body !== undefined) req = req.send(body as object);
    const res = await req;
    if (path.startsWith('/api/v1/auth/sign') && res.status < 300) this.csrfToken = null;
    return res;
  }

  get(path: string): Promise<Response> {
    return this.request('get', path);
  }
  post(path: string, body?: unknown): Promise<Response> {
    return this.request('post', path, body);
  }
  put(path: string, body?: unknown): Promise<Response> {
    return this.request('put', path, body);
  }
  patch(path: string, body?: unknown): Promise<Response> {
    return this.request('patch', path, body);
  }
  delete(path: string, body?: unknown): Promise<Response> {
    return this.request('delete', path, body);
  }
}

export interface SignedUp {
  client: ApiClient;
  me: Me;
  email: string;
  password: string;
  userId: number;
  clubId: number;
}

/** Signs up a new user (and their club, where they are admin) through the API. */
export async function signUp(app: Express, overrides: Partial<{ email: string; password: string; displayName: string; clubName: string }> = {}): Promise<SignedUp> {
  const client = new ApiClient(app);
  const email = overrides.email ?? uniqueEmail('admin');
  const password = overrides.password ?? TEST_PASSWORD;
  const res = await client.post('/api/v1/auth/signup', {
    email,
    password,
    displayName: overrides.displayName ?? 'Test Admin',
    clubName: overrides.clubName ?? 'Test Club',
  });
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`);
  const me = (res.body as { data: Me }).data;
  return { client, me, email, password, userId: me.user.id, clubId: me.memberships[0].clubId };
}

/** Signs in through the API; throws unless it succeeds. */
export async function signIn(app: Express, email: string, password = TEST_PASSWORD): Promise<ApiClient> {
  const client = new ApiClient(app);
  const res = await client.post('/api/v1/auth/signin', { email, password });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${JSON.stringify(res.body)}`);
  return client;
}

let passwordHash: Promise<string> | undefined;

export interface Member {
  userId: number;
  email: string;
  membershipId: number;
  /** The athlete profile of an athlete member, else null. */
  athleteProfileId: number | null;
}

/**
 * Adds a member to a club straight in the database (there is no invitation endpoint yet): a new user with
 * TEST_PASSWORD, the membership, and for athletes an athlete profile linked to the user.
 */
export async function addMember(clubId: number, role: Role, displayName = `Test ${role}`): Promise<Member> {
  passwordHash ??= hashPassword(TEST_PASSWORD);
  const email = uniqueEmail(role);
  const user = await User.create({ email, passwordHash: await passwordHash, googleSub: null, displayName });
  const membership = await Membership.create({ userId: user.id, clubId, role });
  let athleteProfileId: number | null = null;
  if (role === 'athlete') {
    const profile = await AthleteProfile.create({ clubId, userId: user.id, displayName, birthYear: 2008, dominantSide: 'right', position: 'punter' });
    athleteProfileId = profile.id;
  }
  return { userId: user.id, email, membershipId: membership.id, athleteProfileId };
}

/** Creates an athlete profile without sign-in. */
export async function addAthleteProfile(clubId: number, displayName = 'Unlinked Athlete'): Promise<number> {
  const profile = await AthleteProfile.create({ clubId, userId: null, displayName, birthYear: 2006, dominantSide: 'left', position: 'goal kicker' });
  return profile.id;
}

export interface ClubFixture {
  app: Express;
  clubId: number;
  /** Signed-in clients of each role of the club. */
  admin: ApiClient;
  coach: ApiClient;
  athlete: ApiClient;
  /** The admin of another club: everything of `clubId` must be 404 for them. */
  outsider: ApiClient;
  /** An anonymous client (with a session and CSRF token, but not signed in). */
  anonymous: ApiClient;
  members: { admin: Member; coach: Member; athlete: Member };
  otherClubId: number;
  /** An athlete profile of the club without sign-in (not the athlete's own). */
  otherAthleteProfileId: number;
}

/** A club with an admin, a coach, an athlete (with profile), an unlinked profile, and another club's admin. */
export async function createClubFixture(app: Express = testApp()): Promise<ClubFixture> {
  const owner = await signUp(app, { displayName: 'Fixture Admin', clubName: 'Fixture Club' });
  const adminMembership = await Membership.findOne({ where: { userId: owner.userId, clubId: owner.clubId } });
  const coach = await addMember(owner.clubId, 'coach', 'Fixture Coach');
  const athlete = await addMember(owner.clubId, 'athlete', 'Fixture Athlete');
  const otherAthleteProfileId = await addAthleteProfile(owner.clubId);
  const outsider = await signUp(app, { displayName: 'Other Admin', clubName: 'Other Club' });
  const anonymous = new ApiClient(app);
  await anonymous.refreshCsrf();
  return {
    app,
    clubId: owner.clubId,
    admin: owner.client,
    coach: await signIn(app, coach.email),
    athlete: await signIn(app, athlete.email),
    outsider: outsider.client,
    anonymous,
    members: {
      admin: { userId: owner.userId, email: owner.email, membershipId: adminMembership?.id ?? 0, athleteProfileId: null },
      coach,
      athlete,
    },
    otherClubId: outsider.clubId,
    otherAthleteProfileId,
  };
}

/** Re-export for tests that need direct model access. */
export { AthleteProfile, Club, Membership, User, sequelize };
