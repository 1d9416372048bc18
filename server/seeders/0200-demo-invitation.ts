/**
 * One pending invitation in the demo club: an athlete invitation tied to the profile "Juno Pelham", so the
 * admin's member list shows how a pending invitation looks. No e-mail is sent and the link's token is
 * thrown away; Resend sends a working link. Idempotent: an invitation to the address (in any state) is left alone.
 */
import type { Transaction } from 'sequelize';
import { newToken } from '../auth/tokens';
import { AthleteProfile, Club, Invitation, User } from '../models';
import { INVITATION_TTL_DAYS } from '../services/invitations';
import { DEMO_CLUB_NAME, DEMO_USERS } from './0001-demo-club';

export const DEMO_INVITATION = { email: 'juno.pelham@fennickvale.example', athleteName: 'Juno Pelham' } as const;

export async function seed(transaction: Transaction): Promise<string> {
  const club = await Club.findOne({ where: { name: DEMO_CLUB_NAME }, transaction });
  if (!club) return 'no demo club, no invitation';
  const existing = await Invitation.findOne({ where: { clubId: club.id, email: DEMO_INVITATION.email }, transaction });
  if (existing) return 'demo invitation already present';
  const admin = await User.findOne({ where: { email: DEMO_USERS[0].email }, transaction });
  const profile = await AthleteProfile.findOne({ where: { clubId: club.id, userId: null, displayName: DEMO_INVITATION.athleteName }, transaction });
  const now = new Date();
  await Invitation.create(
    {
      clubId: club.id,
      email: DEMO_INVITATION.email,
      role: 'athlete',
      athleteProfileId: profile?.id ?? null,
      invitedByUserId: admin?.id ?? null,
      tokenHash: newToken().hash,
      expiresAt: new Date(now.getTime() + INVITATION_TTL_DAYS * 24 * 3600 * 1000),
      sentAt: now,
    },
    { transaction },
  );
  return `pending invitation for ${DEMO_INVITATION.email} created`;
}
