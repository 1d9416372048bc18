/**
 * Athlete seats through the invitation and member routes: an athlete invitation, its acceptance and a role
 * change to athlete are each refused with SEAT_LIMIT_REACHED once the paid seats are taken, and nothing changes.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ClubSubscription, Invitation } from '../../server/models';
import { findSubscription } from '../../server/services/subscriptions';
import { ApiClient, addMember, createClubFixture, Membership, testApp, uniqueEmail, type ClubFixture } from '../support/app';
import { linkToken, useTestMailbox, type TestMailbox } from '../support/mail';

let mail: TestMailbox;
let f: ClubFixture;
const invitations = () => `/api/v1/clubs/${f.clubId}/invitations`;

/** Gives the club exactly `free` athlete seats beyond its athlete members. */
async function leaveFreeSeats(free: number): Promise<void> {
  await findSubscription(f.clubId);
  const athletes = await Membership.count({ where: { clubId: f.clubId, role: 'athlete' } });
  await ClubSubscription.update({ athleteSeats: athletes + free }, { where: { clubId: f.clubId } });
}

beforeAll(async () => {
  mail = await useTestMailbox();
  f = await createClubFixture(testApp());
});

afterAll(async () => {
  await mail.close();
});

describe('athlete seats on invitations and roles', () => {
  it('refuses an athlete invitation when a pending invitation holds the last seat', async () => {
    await leaveFreeSeats(1);
    const first = await f.admin.post(invitations(), { email: uniqueEmail('seat-first'), role: 'athlete' });
    expect(first.status, JSON.stringify(first.body)).toBe(201);
    const second = await f.admin.post(invitations(), { email: uniqueEmail('seat-second'), role: 'athlete' });
    expect(second.status).toBe(409);
    expect(second.body.error.code).toBe('SEAT_LIMIT_REACHED');
    expect(second.body.error.message).toMatch(/athlete seats? (is|are) taken \(1 of them by pending invitations\)\. Add seats on Seats & billing/);
    expect(await Invitation.count({ where: { clubId: f.clubId, status: 'pending' } })).toBe(1);
  });

  it('refuses to make a coach an athlete when every seat is taken', async () => {
    await leaveFreeSeats(0);
    const coach = await addMember(f.clubId, 'coach', 'Seatless Coach');
    const res = await f.admin.patch(`/api/v1/clubs/${f.clubId}/members/${coach.membershipId}`, { role: 'athlete' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('SEAT_LIMIT_REACHED');
    expect((await Membership.findByPk(coach.membershipId))!.role).toBe('coach');
  });

  it('refuses to accept an athlete invitation once its seat was taken meanwhile, and keeps it pending', async () => {
    await Invitation.update({ status: 'revoked' }, { where: { clubId: f.clubId, status: 'pending' } });
    await leaveFreeSeats(1);
    const email = uniqueEmail('seat-late');
    const since = mail.lastId();
    const sent = await f.admin.post(invitations(), { email, role: 'athlete' });
    expect(sent.status, JSON.stringify(sent.body)).toBe(201);
    const token = linkToken(await mail.waitFor(email, since), '/join/');
    await addMember(f.clubId, 'athlete', 'Seat Taker');
    const res = await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, { displayName: 'Late Invitee', password: 'Late-invitee 42' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('SEAT_LIMIT_REACHED');
    expect(await Invitation.findByPk(sent.body.data.id)).toMatchObject({ status: 'pending' });
  });
});
