import { beforeAll, describe, expect, it } from 'vitest';
import type { Note } from '../../shared/schemas/note';
import { addMember, createClubFixture, signIn, testApp, type ApiClient, type ClubFixture } from '../support/app';
import { recordFlights, recordSession } from '../support/records';

describe('notes: coach notes on flights and sessions', () => {
  let f: ClubFixture;
  let secondCoach: ApiClient;
  const ids = { ownFlight: 0, teammateFlight: 0, session: 0, teammateSession: 0 };

  beforeAll(async () => {
    f = await createClubFixture(testApp());
    const coach = await addMember(f.clubId, 'coach', 'Second Coach');
    secondCoach = await signIn(f.app, coach.email);
    const s = await recordSession(f.clubId, '2026-04-10');
    [ids.ownFlight, ids.teammateFlight] = await recordFlights(f.clubId, s.clipId, [{ athleteId: f.members.athlete.athleteProfileId! }, { athleteId: f.otherAthleteProfileId }]);
    ids.session = s.sessionId;
    const other = await recordSession(f.clubId, '2026-04-11');
    await recordFlights(f.clubId, other.clipId, [{ athleteId: f.otherAthleteProfileId }]);
    ids.teammateSession = other.sessionId;
  });

  const flightNotes = (flightId: number) => `/api/v1/clubs/${f.clubId}/flights/${flightId}/notes`;
  const sessionNotes = (sessionId: number) => `/api/v1/clubs/${f.clubId}/sessions/${sessionId}/notes`;

  it('lets a coach add a private and a shared note to a flight, private by default', async () => {
    const priv = await f.coach.post(flightNotes(ids.ownFlight), { body: '  Release point drifts late.  ' });
    expect(priv.status).toBe(201);
    expect(priv.body.data).toMatchObject({ flightId: ids.ownFlight, sessionId: null, body: 'Release point drifts late.', visibility: 'staff', authorName: 'Fixture Coach', mine: true });
    const shared = await f.coach.post(flightNotes(ids.ownFlight), { body: 'Great height on this one.', visibility: 'shared' });
    expect(shared.status).toBe(201);
    const staff = (await f.admin.get(flightNotes(ids.ownFlight))).body.data as Note[];
    expect(staff.map((n) => n.visibility)).toEqual(['staff', 'shared']);
    expect(staff.every((n) => !n.mine)).toBe(true);
  });

  it('shows an athlete only the shared notes on their own flight', async () => {
    const res = await f.athlete.get(flightNotes(ids.ownFlight));
    expect(res.status).toBe(200);
    expect((res.body.data as Note[]).map((n) => n.body)).toEqual(['Great height on this one.']);
  });

  it('answers 404 when an athlete asks for the notes of a teammate’s flight, shared or not', async () => {
    await f.coach.post(flightNotes(ids.teammateFlight), { body: 'Shared with the teammate.', visibility: 'shared' });
    const res = await f.athlete.get(flightNotes(ids.teammateFlight));
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
  });

  it('shows an athlete the shared session notes of a session holding their flight, and 404 for another session', async () => {
    await f.coach.post(sessionNotes(ids.session), { body: 'Wind picked up after six.', visibility: 'shared' });
    await f.coach.post(sessionNotes(ids.session), { body: 'Staff only: check the camera mount.' });
    const mine = await f.athlete.get(sessionNotes(ids.session));
    expect(mine.status).toBe(200);
    expect((mine.body.data as Note[]).map((n) => n.body)).toEqual(['Wind picked up after six.']);
    const coach = await f.coach.get(sessionNotes(ids.session));
    expect(coach.body.data).toHaveLength(2);
    expect((await f.athlete.get(sessionNotes(ids.teammateSession))).status).toBe(404);
  });

  it('refuses an empty note and an unknown visibility with a message that says what to do', async () => {
    const empty = await f.coach.post(flightNotes(ids.ownFlight), { body: '   ' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.fields.body).toBe('Write the note; it is empty.');
    const vis = await f.coach.post(flightNotes(ids.ownFlight), { body: 'x', visibility: 'everyone' });
    expect(vis.status).toBe(400);
    expect(vis.body.error.fields.visibility).toMatch(/staff \(coaches and admins\) or shared/);
  });

  it('lets the author edit and share a note, and answers 403 to another coach', async () => {
    const note = (await f.coach.post(flightNotes(ids.ownFlight), { body: 'Draft' })).body.data as Note;
    const other = await secondCoach.patch(`/api/v1/clubs/${f.clubId}/notes/${note.id}`, { body: 'Hijacked' });
    expect(other.status).toBe(403);
    expect(other.body.error.message).toMatch(/Only the note’s author \(Fixture Coach\) or a club admin/);
    const del = await secondCoach.delete(`/api/v1/clubs/${f.clubId}/notes/${note.id}`);
    expect(del.status).toBe(403);
    const edited = await f.coach.patch(`/api/v1/clubs/${f.clubId}/notes/${note.id}`, { body: 'Final', visibility: 'shared' });
    expect(edited.status).toBe(200);
    expect(edited.body.data).toMatchObject({ body: 'Final', visibility: 'shared', mine: true });
    expect(((await f.athlete.get(flightNotes(ids.ownFlight))).body.data as Note[]).map((n) => n.body)).toContain('Final');
  });

  it('lets an admin edit and delete any coach’s note', async () => {
    const note = (await f.coach.post(flightNotes(ids.ownFlight), { body: 'To go' })).body.data as Note;
    expect((await f.admin.patch(`/api/v1/clubs/${f.clubId}/notes/${note.id}`, { body: 'Edited by admin' })).status).toBe(200);
    expect((await f.admin.delete(`/api/v1/clubs/${f.clubId}/notes/${note.id}`)).status).toBe(204);
    expect((await f.coach.patch(`/api/v1/clubs/${f.clubId}/notes/${note.id}`, { body: 'gone' })).status).toBe(404);
  });

  it('answers 404 for another club’s note through the caller’s own club', async () => {
    const g = await createClubFixture(f.app);
    const s = await recordSession(g.clubId, '2026-04-12');
    const [flightId] = await recordFlights(g.clubId, s.clipId, [{ athleteId: g.otherAthleteProfileId }]);
    const note = (await g.coach.post(`/api/v1/clubs/${g.clubId}/flights/${flightId}/notes`, { body: 'Elsewhere' })).body.data as Note;
    expect((await f.admin.patch(`/api/v1/clubs/${f.clubId}/notes/${note.id}`, { body: 'x' })).status).toBe(404);
    expect((await f.admin.get(`/api/v1/clubs/${f.clubId}/flights/${flightId}/notes`)).status).toBe(404);
  });

  it('lists on My flights only the shared notes of the athlete’s own flights and sessions', async () => {
    const res = await f.athlete.get(`/api/v1/clubs/${f.clubId}/my-flights`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const bodies = (res.body.data.sharedNotes as Note[]).map((n) => n.body);
    expect(bodies).toEqual(expect.arrayContaining(['Great height on this one.', 'Wind picked up after six.', 'Final']));
    expect(bodies).not.toContain('Shared with the teammate.');
    expect(bodies).not.toContain('Release point drifts late.');
    expect(bodies).not.toContain('Staff only: check the camera mount.');
  });
});
