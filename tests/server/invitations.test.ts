import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Invitation } from '../../server/models';
import {
  AthleteProfile,
  ApiClient,
  addMember,
  createClubFixture,
  Membership,
  signIn,
  signUp,
  TEST_PASSWORD,
  testApp,
  uniqueEmail,
  User,
  type ClubFixture,
} from '../support/app';
import { linkToken, useTestMailbox, type TestMailbox } from '../support/mail';

const NEW_PASSWORD = 'Penhallow-field 7';

let mail: TestMailbox;
let f: ClubFixture;
const base = () => `/api/v1/clubs/${f.clubId}/invitations`;

beforeAll(async () => {
  mail = await useTestMailbox();
  f = await createClubFixture(testApp());
});

afterAll(async () => {
  await mail.close();
});

/** Invites an address as the fixture's admin and returns the invitation and the token from its e-mail. */
async function invite(body: { email: string; role: string; athleteProfileId?: number }) {
  const since = mail.lastId();
  const res = await f.admin.post(base(), body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const message = await mail.waitFor(body.email, since);
  return { invitation: res.body.data, token: linkToken(message, '/join/'), message };
}

describe('invitations: create and list', () => {
  it('creates a pending invitation and e-mails a join link when an admin invites an address', async () => {
    const email = uniqueEmail('invitee');
    const { invitation, message } = await invite({ email: email.toUpperCase(), role: 'coach' });
    expect(invitation).toMatchObject({ email, role: 'coach', state: 'pending', invitedByName: 'Fixture Admin', athleteProfileId: null });
    expect(new Date(invitation.expiresAt).getTime() - Date.now()).toBeGreaterThan(6.9 * 24 * 3600 * 1000);
    expect(message.subject).toBe('Fixture Admin invites you to Fixture Club on Arcwright');
    expect(message.text).toContain('as a coach');
    expect(message.html).toContain('/join/');
    // No remote images or tracking pixels: the HTML loads nothing.
    expect(message.html).not.toMatch(/<img|<script|<link|url\(/i);
    const list = await f.admin.get(base());
    expect(list.status).toBe(200);
    expect(list.body.data[0]).toMatchObject({ id: invitation.id, state: 'pending' });
  });

  it('stores only the hash of the token when an invitation is created', async () => {
    const { invitation, token } = await invite({ email: uniqueEmail('hash'), role: 'coach' });
    const row = await Invitation.findByPk(invitation.id);
    expect(row?.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(row?.tokenHash).not.toContain(token);
  });

  it('refuses a malformed address with a message that says how to write one', async () => {
    const res = await f.admin.post(base(), { email: 'juno.pelham(at)fennickvale', role: 'athlete' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.email).toBe('That is not an e-mail address: write it like name@club.example.');
    expect(await Invitation.count({ where: { clubId: f.clubId, email: 'juno.pelham(at)fennickvale' } })).toBe(0);
  });

  it('refuses an address that already belongs to a member of the club', async () => {
    const since = mail.lastId();
    const res = await f.admin.post(base(), { email: f.members.coach.email, role: 'athlete' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('ALREADY_MEMBER');
    expect(res.body.error.message).toBe(`${f.members.coach.email} is already a member of this club, as a coach. Change their role in the member list instead.`);
    expect(mail.lastId()).toBe(since);
  });

  it('refuses a second invitation while one to the same address is pending', async () => {
    const email = uniqueEmail('twice');
    await invite({ email, role: 'coach' });
    const res = await f.admin.post(base(), { email, role: 'coach' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVITATION_PENDING');
    expect(res.body.error.message).toContain('Use Resend on it in the list, or revoke it first.');
  });

  it('refuses to tie a coach invitation to an athlete profile', async () => {
    const res = await f.admin.post(base(), { email: uniqueEmail('tie'), role: 'coach', athleteProfileId: f.otherAthleteProfileId });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.athleteProfileId).toBe('Only an athlete invitation can be tied to an athlete profile: pick the athlete role or clear the profile.');
  });

  it('refuses to tie an invitation to a profile of another club', async () => {
    const other = await AthleteProfile.create({ clubId: f.otherClubId, userId: null, displayName: 'Elsewhere Athlete', birthYear: null, dominantSide: null, position: null });
    const res = await f.admin.post(base(), { email: uniqueEmail('tie'), role: 'athlete', athleteProfileId: other.id });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.athleteProfileId).toBe('No such athlete profile in this club; pick one from the list.');
  });

  it('refuses to tie an invitation to a profile someone already signs in as', async () => {
    const res = await f.admin.post(base(), { email: uniqueEmail('tie'), role: 'athlete', athleteProfileId: f.members.athlete.athleteProfileId });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.athleteProfileId).toBe('Fixture Athlete already signs in with an account of their own; pick another profile or leave it empty.');
  });

  it('answers 503 and keeps nothing when the mail server does not take the message', async () => {
    const email = uniqueEmail('nomail');
    const { config } = await import('../../server/config');
    const port = config.mail.port;
    config.mail.port = 1;
    try {
      const res = await f.admin.post(base(), { email, role: 'coach' });
      expect(res.status).toBe(503);
      expect(res.body.error.code).toBe('MAIL_UNAVAILABLE');
      expect(res.body.error.message).toContain('Nothing was changed');
    } finally {
      config.mail.port = port;
    }
    expect(await Invitation.count({ where: { email } })).toBe(0);
  });
});

describe('invitations: accept', () => {
  it('creates the account, joins the club and signs in when a new person accepts', async () => {
    const email = uniqueEmail('newcoach');
    const { token } = await invite({ email, role: 'coach' });
    const visitor = new ApiClient(f.app);
    const preview = await visitor.get(`/api/v1/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(preview.body.data).toMatchObject({ clubName: 'Fixture Club', role: 'coach', email, hasAccount: false, signedInAsInvitee: false, invitedByName: 'Fixture Admin' });

    const res = await visitor.post(`/api/v1/invitations/${token}/accept`, { displayName: 'Odile Penhallow', password: NEW_PASSWORD });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.data).toMatchObject({ clubId: f.clubId, clubName: 'Fixture Club', role: 'coach' });
    expect(res.body.data.me.user).toMatchObject({ email, displayName: 'Odile Penhallow' });
    const me = await visitor.get('/api/v1/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.data.memberships).toEqual([expect.objectContaining({ clubId: f.clubId, role: 'coach' })]);
    await signIn(f.app, email, NEW_PASSWORD);
    const list = await f.admin.get(base());
    expect(list.body.data.find((i: { email: string }) => i.email === email)).toMatchObject({ state: 'accepted' });
  });

  it('asks a new person for a name and a password when they leave them out', async () => {
    const { token } = await invite({ email: uniqueEmail('blank'), role: 'coach' });
    const res = await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, {});
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ displayName: 'Enter your name as teammates know it.', password: 'Choose a password.' });
  });

  it('refuses a weak password of a new person and leaves the invitation usable', async () => {
    const { token } = await invite({ email: uniqueEmail('weak'), role: 'coach' });
    const visitor = new ApiClient(f.app);
    const res = await visitor.post(`/api/v1/invitations/${token}/accept`, { displayName: 'Short Pass', password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.password).toContain('at least 10 characters');
    expect((await visitor.get(`/api/v1/invitations/${token}`)).status).toBe(200);
  });

  it('joins the club when an existing user accepts while signed in with the invited address', async () => {
    const existing = await signUp(f.app, { displayName: 'Existing Person', clubName: 'Their Own Club' });
    const { token } = await invite({ email: existing.email, role: 'coach' });
    const preview = await existing.client.get(`/api/v1/invitations/${token}`);
    expect(preview.body.data).toMatchObject({ hasAccount: true, signedInAsInvitee: true });
    const res = await existing.client.post(`/api/v1/invitations/${token}/accept`, {});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.data.me.memberships.map((m: { clubId: number }) => m.clubId).sort()).toEqual([existing.clubId, f.clubId].sort());
  });

  it('asks an existing user to sign in first when they accept signed out', async () => {
    const existing = await signUp(f.app, { displayName: 'Signed Out Person' });
    const { token } = await invite({ email: existing.email, role: 'coach' });
    const visitor = new ApiClient(f.app);
    expect((await visitor.get(`/api/v1/invitations/${token}`)).body.data.hasAccount).toBe(true);
    const res = await visitor.post(`/api/v1/invitations/${token}/accept`, { displayName: 'Someone Else', password: NEW_PASSWORD });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('EMAIL_TAKEN');
    expect(res.body.error.message).toBe(`An account with ${existing.email} already exists. Sign in with it, then open the link again to join.`);
    expect(await Membership.count({ where: { userId: existing.userId, clubId: f.clubId } })).toBe(0);
  });

  it('refuses when someone signed in with another address accepts', async () => {
    const { token } = await invite({ email: uniqueEmail('meant'), role: 'coach' });
    const res = await f.outsider.post(`/api/v1/invitations/${token}/accept`, {});
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('INVITATION_EMAIL_MISMATCH');
    expect(res.body.error.message).toMatch(/^This invitation is for .+, but you are signed in as .+\. Sign out, then open the link again\.$/);
  });

  it('refuses when the invitee became a member before accepting', async () => {
    const existing = await signUp(f.app, { displayName: 'Joined Meanwhile' });
    const { token } = await invite({ email: existing.email, role: 'coach' });
    await Membership.create({ userId: existing.userId, clubId: f.clubId, role: 'coach' });
    const res = await existing.client.post(`/api/v1/invitations/${token}/accept`, {});
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('ALREADY_MEMBER');
    expect(res.body.error.message).toBe('You are already a member of Fixture Club. Pick it in the club switcher.');
  });

  it('gives the athlete the tied profile with its history when an athlete invitation tied to a profile is accepted', async () => {
    const profileId = (await AthleteProfile.create({ clubId: f.clubId, userId: null, displayName: 'Juno Pelham', birthYear: 2008, dominantSide: 'both', position: 'long throw-in' })).id;
    const email = uniqueEmail('juno');
    const { token, invitation, message } = await invite({ email, role: 'athlete', athleteProfileId: profileId });
    expect(invitation).toMatchObject({ athleteProfileId: profileId, athleteName: 'Juno Pelham' });
    expect(message.text).toContain('recorded under the profile "Juno Pelham"');
    const visitor = new ApiClient(f.app);
    expect((await visitor.get(`/api/v1/invitations/${token}`)).body.data.athleteName).toBe('Juno Pelham');
    const res = await visitor.post(`/api/v1/invitations/${token}/accept`, { displayName: 'Juno P.', password: NEW_PASSWORD });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const membership = res.body.data.me.memberships[0];
    expect(membership).toMatchObject({ role: 'athlete', athleteProfileId: profileId });
    const user = await User.findOne({ where: { email } });
    expect((await AthleteProfile.findByPk(profileId))?.userId).toBe(user?.id);
    expect(await AthleteProfile.count({ where: { clubId: f.clubId, userId: user?.id ?? 0 } })).toBe(1);
  });

  it('gives an athlete without a tied profile a new profile under their name', async () => {
    const email = uniqueEmail('fresh');
    const { token } = await invite({ email, role: 'athlete' });
    const res = await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, { displayName: 'Fresh Athlete', password: NEW_PASSWORD });
    expect(res.status).toBe(200);
    const profile = await AthleteProfile.findByPk(res.body.data.me.memberships[0].athleteProfileId);
    expect(profile).toMatchObject({ clubId: f.clubId, displayName: 'Fresh Athlete' });
  });
});

describe('invitations: used, expired, revoked and replaced links', () => {
  it('refuses a link that was already used', async () => {
    const { token } = await invite({ email: uniqueEmail('reuse'), role: 'coach' });
    expect((await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, { displayName: 'First Use', password: NEW_PASSWORD })).status).toBe(200);
    const again = await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, { displayName: 'Second Use', password: NEW_PASSWORD });
    expect(again.status).toBe(410);
    expect(again.body.error).toMatchObject({ code: 'INVITATION_USED', message: 'This invitation has already been used. Sign in to reach the club.' });
    expect((await new ApiClient(f.app).get(`/api/v1/invitations/${token}`)).body.error.code).toBe('INVITATION_USED');
  });

  it('refuses an expired link and lists the invitation as expired', async () => {
    const { token, invitation } = await invite({ email: uniqueEmail('late'), role: 'coach' });
    await Invitation.update({ expiresAt: new Date(Date.now() - 60_000) }, { where: { id: invitation.id } });
    const res = await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, { displayName: 'Too Late', password: NEW_PASSWORD });
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe('INVITATION_EXPIRED');
    expect(res.body.error.message).toMatch(/^This invitation expired on .+\. Ask the club admin to send it again; the new e-mail has a fresh link\.$/);
    const list = await f.admin.get(base());
    expect(list.body.data.find((i: { id: number }) => i.id === invitation.id).state).toBe('expired');
  });

  it('refuses a revoked link and lists the invitation as revoked', async () => {
    const { token, invitation } = await invite({ email: uniqueEmail('revoked'), role: 'coach' });
    const revoked = await f.admin.post(`${base()}/${invitation.id}/revoke`);
    expect(revoked.status).toBe(200);
    expect(revoked.body.data.state).toBe('revoked');
    const res = await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, { displayName: 'Not Wanted', password: NEW_PASSWORD });
    expect(res.status).toBe(410);
    expect(res.body.error).toMatchObject({ code: 'INVITATION_REVOKED', message: 'The club withdrew this invitation. Ask the club admin if you should still join.' });
  });

  it('refuses to resend a revoked invitation', async () => {
    const { invitation } = await invite({ email: uniqueEmail('revoked'), role: 'coach' });
    await f.admin.post(`${base()}/${invitation.id}/revoke`);
    const res = await f.admin.post(`${base()}/${invitation.id}/resend`);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe(`This invitation was revoked. To invite ${invitation.email} again, send a new invitation.`);
  });

  it('refuses to revoke or resend an accepted invitation', async () => {
    const { token, invitation } = await invite({ email: uniqueEmail('done'), role: 'coach' });
    await new ApiClient(f.app).post(`/api/v1/invitations/${token}/accept`, { displayName: 'Done Deal', password: NEW_PASSWORD });
    const revoke = await f.admin.post(`${base()}/${invitation.id}/revoke`);
    expect(revoke.status).toBe(409);
    expect(revoke.body.error.message).toBe(`${invitation.email} has already accepted this invitation. To take them out of the club, remove them in the member list.`);
    const resend = await f.admin.post(`${base()}/${invitation.id}/resend`);
    expect(resend.status).toBe(409);
    expect(resend.body.error.message).toMatch(/accepted this invitation on .+; there is nothing to resend\.$/);
  });

  it('sends a new link and kills the old one when an invitation is resent', async () => {
    const email = uniqueEmail('resend');
    const { token: oldToken, invitation } = await invite({ email, role: 'coach' });
    await Invitation.update({ expiresAt: new Date(Date.now() - 60_000) }, { where: { id: invitation.id } });
    const since = mail.lastId();
    const res = await f.admin.post(`${base()}/${invitation.id}/resend`);
    expect(res.status).toBe(200);
    expect(res.body.data.state).toBe('pending');
    const newToken = linkToken(await mail.waitFor(email, since), '/join/');
    expect(newToken).not.toBe(oldToken);
    const old = await new ApiClient(f.app).get(`/api/v1/invitations/${oldToken}`);
    expect(old.status).toBe(404);
    expect(old.body.error.code).toBe('INVITATION_INVALID');
    expect((await new ApiClient(f.app).post(`/api/v1/invitations/${newToken}/accept`, { displayName: 'Second Mail', password: NEW_PASSWORD })).status).toBe(200);
  });

  it('answers the same clear 404 for a cut-off link and an unknown one', async () => {
    const cut = await new ApiClient(f.app).get('/api/v1/invitations/abc123');
    const unknown = await new ApiClient(f.app).get(`/api/v1/invitations/${'A'.repeat(43)}`);
    expect(cut.status).toBe(404);
    expect(cut.body).toEqual(unknown.body);
    expect(cut.body.error.message).toBe(
      'This invitation link is not valid: it may have been cut short when it was copied, or replaced by a newer e-mail. Open the link in the latest invitation, or ask the club admin to send it again.',
    );
  });
});

describe('invitations: who may manage them', () => {
  it('answers 404 when an admin resends or revokes another club’s invitation through their own club', async () => {
    const { invitation } = await invite({ email: uniqueEmail('foreign'), role: 'coach' });
    const other = await createClubFixture(f.app);
    const resend = await other.admin.post(`/api/v1/clubs/${other.clubId}/invitations/${invitation.id}/resend`);
    const revoke = await other.admin.post(`/api/v1/clubs/${other.clubId}/invitations/${invitation.id}/revoke`);
    expect(resend.status).toBe(404);
    expect(revoke.status).toBe(404);
    expect((await Invitation.findByPk(invitation.id))?.status).toBe('pending');
  });

  it('lets a member made admin manage invitations', async () => {
    const coach = await addMember(f.clubId, 'admin', 'Second Admin');
    const client = await signIn(f.app, coach.email, TEST_PASSWORD);
    const res = await client.get(base());
    expect(res.status).toBe(200);
  });
});
