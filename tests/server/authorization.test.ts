/**
 * Role and cross-club denials for every foundation route: each route × {admin, coach, athlete,
 * another club's admin, anonymous} with the expected status. A completeness check makes sure a new
 * route of these routers cannot be added without a row here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { newToken } from '../../server/auth/tokens';
import { ClubBall, Invitation } from '../../server/models';
import { athletesRouter } from '../../server/routes/athletes';
import { ballsRouter } from '../../server/routes/balls';
import { clubsRouter } from '../../server/routes/clubs';
import { invitationsRouter } from '../../server/routes/invitations';
import { membersRouter } from '../../server/routes/members';
import { addMember, createClubFixture, testApp, uniqueEmail, type ApiClient, type ClubFixture } from '../support/app';
import { useTestMailbox, type TestMailbox } from '../support/mail';
import { routesOf } from '../support/routes';

type Who = 'admin' | 'coach' | 'athlete' | 'outsider' | 'anonymous';
type Method = 'get' | 'post' | 'patch' | 'delete';

interface Case {
  method: Method;
  /** Express route pattern, matched against the routers' own table. */
  route: string;
  /** The concrete path for a fixture. */
  path: (f: ClubFixture) => string;
  body?: (f: ClubFixture) => unknown;
  expect: Record<Who, number>;
}

const club = (f: ClubFixture) => `/api/v1/clubs/${f.clubId}`;
/** Records the matrix acts on, made for it in beforeAll. */
const targets = { removableMemberId: 0, resendInvitationId: 0, revokeInvitationId: 0, ballId: 0, deletableBallIds: [] as number[] };
let ballSeq = 0;

const CASES: Case[] = [
  {
    method: 'get',
    route: '/clubs/:clubId/overview',
    path: (f) => `${club(f)}/overview`,
    expect: { admin: 200, coach: 200, athlete: 200, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId',
    path: club,
    expect: { admin: 200, coach: 200, athlete: 200, outsider: 404, anonymous: 401 },
  },
  {
    method: 'patch',
    route: '/clubs/:clubId',
    path: club,
    body: () => ({ units: 'imperial' }),
    expect: { admin: 200, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/members',
    path: (f) => `${club(f)}/members`,
    expect: { admin: 200, coach: 200, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'patch',
    route: '/clubs/:clubId/members/:memberId',
    path: (f) => `${club(f)}/members/${f.members.coach.membershipId}`,
    body: () => ({ role: 'coach' }),
    expect: { admin: 200, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'delete',
    route: '/clubs/:clubId/members/:memberId',
    path: (f) => `${club(f)}/members/${targets.removableMemberId}`,
    expect: { admin: 204, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/invitations',
    path: (f) => `${club(f)}/invitations`,
    expect: { admin: 200, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/invitations',
    path: (f) => `${club(f)}/invitations`,
    body: () => ({ email: uniqueEmail('matrix'), role: 'coach' }),
    expect: { admin: 201, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/invitations/:invitationId/resend',
    path: (f) => `${club(f)}/invitations/${targets.resendInvitationId}/resend`,
    expect: { admin: 200, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/invitations/:invitationId/revoke',
    path: (f) => `${club(f)}/invitations/${targets.revokeInvitationId}/revoke`,
    expect: { admin: 200, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/athletes',
    path: (f) => `${club(f)}/athletes`,
    expect: { admin: 200, coach: 200, athlete: 200, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/athletes/:athleteId',
    path: (f) => `${club(f)}/athletes/${f.otherAthleteProfileId}`,
    expect: { admin: 200, coach: 200, athlete: 404, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/athletes',
    path: (f) => `${club(f)}/athletes`,
    body: () => ({ displayName: 'Matrix Athlete' }),
    expect: { admin: 201, coach: 201, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'patch',
    route: '/clubs/:clubId/athletes/:athleteId',
    path: (f) => `${club(f)}/athletes/${f.otherAthleteProfileId}`,
    body: () => ({ position: 'place kicker' }),
    expect: { admin: 200, coach: 200, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/balls',
    path: (f) => `${club(f)}/balls`,
    expect: { admin: 200, coach: 200, athlete: 200, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/balls',
    path: (f) => `${club(f)}/balls`,
    body: () => ({ name: `Matrix ball ${++ballSeq}`, massKg: 0.3, diameterM: 0.4 }),
    expect: { admin: 201, coach: 201, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'patch',
    route: '/clubs/:clubId/balls/:ballId',
    path: (f) => `${club(f)}/balls/${targets.ballId}`,
    body: () => ({ massKg: 0.31 }),
    expect: { admin: 200, coach: 200, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'delete',
    route: '/clubs/:clubId/balls/:ballId',
    // One unused ball per caller, so that the admin's delete leaves one for the coach.
    path: (f) => `${club(f)}/balls/${targets.deletableBallIds.shift() ?? 0}`,
    expect: { admin: 204, coach: 204, athlete: 403, outsider: 404, anonymous: 401 },
  },
];

describe('authorization matrix', () => {
  let f: ClubFixture;
  let mail: TestMailbox;
  beforeAll(async () => {
    mail = await useTestMailbox();
    f = await createClubFixture(testApp());
    targets.removableMemberId = (await addMember(f.clubId, 'coach', 'Removable Coach')).membershipId;
    const invitation = (email: string) =>
      Invitation.create({ clubId: f.clubId, email, role: 'coach', athleteProfileId: null, invitedByUserId: null, tokenHash: newToken().hash, expiresAt: new Date(Date.now() + 86_400_000), sentAt: new Date() });
    targets.resendInvitationId = (await invitation(uniqueEmail('resend'))).id;
    targets.revokeInvitationId = (await invitation(uniqueEmail('revoke'))).id;
    const ball = (name: string) => ClubBall.create({ clubId: f.clubId, name, massKg: 0.3, diameterM: 0.4, cdMin: null, cdMax: null });
    targets.ballId = (await ball('Matrix edited ball')).id;
    for (let i = 0; i < 5; i++) targets.deletableBallIds.push((await ball(`Matrix spare ball ${i}`)).id);
  });
  afterAll(async () => {
    await mail.close();
  });

  it('covers every route of the club, member, athlete, invitation and ball routers when a route is added', () => {
    const declared = [clubsRouter, membersRouter, athletesRouter, invitationsRouter, ballsRouter].flatMap(routesOf).sort();
    const tested = [...new Set(CASES.map((c) => `${c.method} ${c.route}`))].sort();
    expect(tested).toEqual(declared);
  });

  const whos: Who[] = ['admin', 'coach', 'athlete', 'outsider', 'anonymous'];
  for (const c of CASES) {
    for (const who of whos) {
      it(`answers ${c.expect[who]} to ${c.method.toUpperCase()} ${c.route} when the caller is ${who}`, async () => {
        const client: ApiClient = f[who];
        const res = await client.request(c.method, c.path(f), c.body?.(f));
        expect(res.status, JSON.stringify(res.body)).toBe(c.expect[who]);
        if (res.status >= 400) {
          const codes: Record<number, string> = { 401: 'UNAUTHENTICATED', 403: 'FORBIDDEN', 404: 'NOT_FOUND' };
          expect(res.body.error.code).toBe(codes[res.status]);
        }
      });
    }
  }
});

describe('authorization: athletes reach only their own records', () => {
  let f: ClubFixture;
  beforeAll(async () => {
    f = await createClubFixture(testApp());
  });

  it('shows an athlete only their own profile in the athlete list', async () => {
    const res = await f.athlete.get(`/api/v1/clubs/${f.clubId}/athletes`);
    expect(res.status).toBe(200);
    expect(res.body.data.map((a: { id: number }) => a.id)).toEqual([f.members.athlete.athleteProfileId]);
    const all = await f.coach.get(`/api/v1/clubs/${f.clubId}/athletes`);
    expect(all.body.data.map((a: { id: number }) => a.id).sort()).toEqual(
      [f.members.athlete.athleteProfileId, f.otherAthleteProfileId].sort(),
    );
  });

  it('lets an athlete read their own profile when they ask by id', async () => {
    const res = await f.athlete.get(`/api/v1/clubs/${f.clubId}/athletes/${f.members.athlete.athleteProfileId}`);
    expect(res.status).toBe(200);
    expect(res.body.data.displayName).toBe('Fixture Athlete');
  });

  it('counts only the athlete’s own profile on their Overview', async () => {
    const mine = await f.athlete.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect(mine.body.data.counts.athleteProfiles).toBe(1);
    expect(mine.body.data.role).toBe('athlete');
    const coach = await f.coach.get(`/api/v1/clubs/${f.clubId}/overview`);
    expect(coach.body.data.counts.athleteProfiles).toBe(2);
  });
});

describe('authorization: another club’s ids', () => {
  let f: ClubFixture;
  let g: ClubFixture;
  beforeAll(async () => {
    const app = testApp();
    f = await createClubFixture(app);
    g = await createClubFixture(app);
  });

  it('answers 404 when an admin asks for another club’s athlete through their own club', async () => {
    const res = await f.admin.get(`/api/v1/clubs/${f.clubId}/athletes/${g.otherAthleteProfileId}`);
    expect(res.status).toBe(404);
    const patch = await f.admin.patch(`/api/v1/clubs/${f.clubId}/athletes/${g.otherAthleteProfileId}`, { position: 'x' });
    expect(patch.status).toBe(404);
  });

  it('answers 404 when an admin changes the role of another club’s member through their own club', async () => {
    const res = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${g.members.coach.membershipId}`, { role: 'admin' });
    expect(res.status).toBe(404);
  });

  it('answers 404 alike for a club that does not exist and one that is not yours', async () => {
    const missing = await f.admin.get('/api/v1/clubs/999999999/overview');
    const foreign = await f.admin.get(`/api/v1/clubs/${g.clubId}/overview`);
    expect(missing.status).toBe(404);
    expect(foreign.status).toBe(404);
    expect(foreign.body).toEqual(missing.body);
  });

  it('answers 404 when the club id is not a number', async () => {
    const res = await f.admin.get('/api/v1/clubs/abc/overview');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
  });
});
