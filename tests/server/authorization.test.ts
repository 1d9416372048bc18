/**
 * Role and cross-club denials for every foundation route: each route × {admin, coach, athlete,
 * another club's admin, anonymous} with the expected status. A completeness check makes sure a new
 * route of these routers cannot be added without a row here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { newToken } from '../../server/auth/tokens';
import { ClubBall, CoachNote, Invitation, WorkloadEntry } from '../../server/models';
import { accountRouter } from '../../server/routes/account';
import { athletesRouter } from '../../server/routes/athletes';
import { ballsRouter } from '../../server/routes/balls';
import { clubsRouter } from '../../server/routes/clubs';
import { invitationsRouter } from '../../server/routes/invitations';
import { membersRouter } from '../../server/routes/members';
import { myFlightsRouter } from '../../server/routes/my-flights';
import { notesRouter } from '../../server/routes/notes';
import { workloadRouter } from '../../server/routes/workload';
import { addMember, createClubFixture, testApp, uniqueEmail, type ApiClient, type ClubFixture } from '../support/app';
import { useTestMailbox, type TestMailbox } from '../support/mail';
import { recordFlights, recordSession } from '../support/records';
import { routesOf } from '../support/routes';

type Who = 'admin' | 'coach' | 'athlete' | 'outsider' | 'anonymous';
type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

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
const targets = {
  removableMemberId: 0,
  resendInvitationId: 0,
  revokeInvitationId: 0,
  /** A teammate's flight and a session holding only it: an athlete gets 404 for both. */
  teammateFlightId: 0,
  teammateSessionId: 0,
  /** A note by the club's coach. */
  noteId: 0,
  /** Fresh records for each call of a delete row (every caller deletes one of their own). */
  notePool: [] as number[],
  entryPool: [] as number[],
  /** A club ball to edit, and one unused ball per caller to delete. */
  ballId: 0,
  deletableBallIds: [] as number[],
};
let ballSeq = 0;

const CASES: Case[] = [
  {
    // The signed-in user's own settings: anyone signed in, in any club or none.
    method: 'patch',
    route: '/account',
    path: () => '/api/v1/account',
    body: () => ({ unitsPreference: 'club' }),
    expect: { admin: 200, coach: 200, athlete: 200, outsider: 200, anonymous: 401 },
  },
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
    route: '/clubs/:clubId/athletes/:athleteId/workload',
    path: (f) => `${club(f)}/athletes/${f.otherAthleteProfileId}/workload`,
    expect: { admin: 200, coach: 200, athlete: 404, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/workload/cautions',
    path: (f) => `${club(f)}/workload/cautions`,
    expect: { admin: 200, coach: 200, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/workload-entries',
    path: (f) => `${club(f)}/workload-entries`,
    body: (f) => ({ athleteId: f.otherAthleteProfileId, action: 'punt', count: 3 }),
    expect: { admin: 201, coach: 201, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'delete',
    route: '/clubs/:clubId/workload-entries/:entryId',
    path: (f) => `${club(f)}/workload-entries/${targets.entryPool.shift()}`,
    expect: { admin: 204, coach: 204, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/workload-thresholds',
    path: (f) => `${club(f)}/workload-thresholds`,
    expect: { admin: 200, coach: 200, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'put',
    route: '/clubs/:clubId/workload-thresholds',
    path: (f) => `${club(f)}/workload-thresholds`,
    body: () => ({ thresholds: [{ action: 'punt', ageBand: '15-16', dailyMax: null, weeklyMax: 40 }] }),
    expect: { admin: 200, coach: 403, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/flights/:flightId/notes',
    path: (f) => `${club(f)}/flights/${targets.teammateFlightId}/notes`,
    expect: { admin: 200, coach: 200, athlete: 404, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/flights/:flightId/notes',
    path: (f) => `${club(f)}/flights/${targets.teammateFlightId}/notes`,
    body: () => ({ body: 'Matrix note', visibility: 'shared' }),
    expect: { admin: 201, coach: 201, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/sessions/:sessionId/notes',
    path: (f) => `${club(f)}/sessions/${targets.teammateSessionId}/notes`,
    expect: { admin: 200, coach: 200, athlete: 404, outsider: 404, anonymous: 401 },
  },
  {
    method: 'post',
    route: '/clubs/:clubId/sessions/:sessionId/notes',
    path: (f) => `${club(f)}/sessions/${targets.teammateSessionId}/notes`,
    body: () => ({ body: 'Matrix session note' }),
    expect: { admin: 201, coach: 201, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'patch',
    route: '/clubs/:clubId/notes/:noteId',
    path: (f) => `${club(f)}/notes/${targets.noteId}`,
    body: () => ({ body: 'Edited in the matrix' }),
    expect: { admin: 200, coach: 200, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'delete',
    route: '/clubs/:clubId/notes/:noteId',
    path: (f) => `${club(f)}/notes/${targets.notePool.shift()}`,
    expect: { admin: 204, coach: 204, athlete: 403, outsider: 404, anonymous: 401 },
  },
  {
    method: 'get',
    route: '/clubs/:clubId/my-flights',
    path: (f) => `${club(f)}/my-flights`,
    expect: { admin: 403, coach: 403, athlete: 200, outsider: 404, anonymous: 401 },
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
    const session = await recordSession(f.clubId, '2026-02-02');
    [targets.teammateFlightId] = await recordFlights(f.clubId, session.clipId, [{ athleteId: f.otherAthleteProfileId }]);
    targets.teammateSessionId = session.sessionId;
    const note = () => CoachNote.create({ clubId: f.clubId, flightId: targets.teammateFlightId, sessionId: null, authorUserId: f.members.coach.userId, body: 'Matrix', visibility: 'staff' });
    targets.noteId = (await note()).id;
    const entry = () => WorkloadEntry.create({ clubId: f.clubId, athleteProfileId: f.otherAthleteProfileId, action: 'punt', day: '2026-02-02', count: 2, note: null, createdByUserId: null });
    for (let i = 0; i < 5; i++) {
      targets.notePool.push((await note()).id);
      targets.entryPool.push((await entry()).id);
    }
  });
  afterAll(async () => {
    await mail.close();
  });

  it('covers every route of the account, club, member, athlete, invitation, ball, workload, notes and My flights routers when a route is added', () => {
    const declared = [accountRouter, clubsRouter, membersRouter, athletesRouter, invitationsRouter, ballsRouter, workloadRouter, notesRouter, myFlightsRouter].flatMap(routesOf).sort();
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
