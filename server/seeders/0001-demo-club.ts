/**
 * The demo club of the invented scenario: "Fennick Vale Sporting Club" with one admin, one coach, one
 * athlete who signs in, and athlete profiles without sign-in: ten athletes from 15 to 47, two of them
 * youths (under 18 in the year the club is seeded). Idempotent: finds before it creates.
 */
import type { Transaction } from 'sequelize';
import type { DominantSide } from '../../shared/schemas/club';
import type { Role } from '../../shared/types/api';
import { hashPassword, verifyPassword } from '../auth/passwords';
import { AthleteProfile, Club, Membership, User } from '../models';

export const DEMO_CLUB_NAME = 'Fennick Vale Sporting Club';
export const DEMO_PASSWORD = 'arcwright-demo';

interface DemoAthlete {
  displayName: string;
  birthYear: number;
  dominantSide: DominantSide;
  position: string;
}

/** Birth year of someone who turns `age` this year: ages stay true whatever year the club is seeded in. */
export function bornYearsAgo(age: number, now = new Date()): number {
  return now.getUTCFullYear() - age;
}

export const DEMO_USERS: { email: string; displayName: string; role: Role; athlete?: DemoAthlete }[] = [
  { email: 'admin@fennickvale.example', displayName: 'Maren Holloway', role: 'admin' },
  { email: 'coach@fennickvale.example', displayName: 'Teodor Quill', role: 'coach' },
  {
    email: 'athlete@fennickvale.example',
    displayName: 'Isla Brackwater',
    role: 'athlete',
    athlete: { displayName: 'Isla Brackwater', birthYear: bornYearsAgo(16), dominantSide: 'right', position: 'punter' },
  },
];

/** Athletes the coaches keep without a sign-in. */
export const DEMO_PROFILES: DemoAthlete[] = [
  { displayName: 'Orrin Calloway', birthYear: bornYearsAgo(20), dominantSide: 'left', position: 'goal kicker' },
  { displayName: 'Saskia Fenwright', birthYear: bornYearsAgo(15), dominantSide: 'right', position: 'outfield thrower' },
  { displayName: 'Bram Tolliver', birthYear: bornYearsAgo(22), dominantSide: 'right', position: 'shot put' },
  { displayName: 'Juno Pelham', birthYear: bornYearsAgo(19), dominantSide: 'both', position: 'long throw-in' },
  { displayName: 'Wren Ashcombe', birthYear: bornYearsAgo(25), dominantSide: 'left', position: 'shot put' },
  { displayName: 'Cato Merriweather', birthYear: bornYearsAgo(29), dominantSide: 'right', position: 'goalkeeper' },
  { displayName: 'Elspeth Rook', birthYear: bornYearsAgo(33), dominantSide: 'right', position: 'handball back' },
  { displayName: 'Perrin Oakhurst', birthYear: bornYearsAgo(47), dominantSide: 'right', position: 'masters shot put' },
  { displayName: 'Nell Hawthorne', birthYear: bornYearsAgo(23), dominantSide: 'left', position: 'place kicker' },
];

async function profile(clubId: number, userId: number | null, athlete: DemoAthlete, transaction: Transaction): Promise<void> {
  const where = userId === null ? { clubId, userId: null, displayName: athlete.displayName } : { clubId, userId };
  const existing = await AthleteProfile.findOne({ where, transaction });
  if (!existing) await AthleteProfile.create({ clubId, userId, ...athlete }, { transaction });
}

/** Seeds the demo club in the given transaction; returns what it created for the log. */
export async function seed(transaction: Transaction): Promise<string> {
  const admin = DEMO_USERS[0];
  let club: Club | null = null;
  const adminUser = await User.findOne({ where: { email: admin.email }, transaction });
  if (adminUser) {
    const membership = await Membership.findOne({
      where: { userId: adminUser.id },
      include: [{ model: Club, as: 'club', where: { name: DEMO_CLUB_NAME } }],
      transaction,
    });
    club = membership?.club ?? null;
  }
  const createdClub = !club;
  club ??= await Club.create({ name: DEMO_CLUB_NAME, sportFocus: 'multi-sport', units: 'metric', defaultConditions: null }, { transaction });

  let createdUsers = 0;
  for (const demo of DEMO_USERS) {
    let user = await User.findOne({ where: { email: demo.email }, transaction });
    if (!user) {
      user = await User.create(
        { email: demo.email, passwordHash: await hashPassword(DEMO_PASSWORD), googleSub: null, displayName: demo.displayName },
        { transaction },
      );
      createdUsers += 1;
    } else if (!user.passwordHash || !(await verifyPassword(DEMO_PASSWORD, user.passwordHash))) {
      // The demo sign-ins are documented; keep them working even if someone changed the password.
      user.passwordHash = await hashPassword(DEMO_PASSWORD);
      await user.save({ transaction });
    }
    const membership = await Membership.findOne({ where: { userId: user.id, clubId: club.id }, transaction });
    if (!membership) await Membership.create({ userId: user.id, clubId: club.id, role: demo.role }, { transaction });
    if (demo.athlete) await profile(club.id, user.id, demo.athlete, transaction);
  }
  for (const athlete of DEMO_PROFILES) await profile(club.id, null, athlete, transaction);
  return createdClub || createdUsers > 0 ? `demo club "${DEMO_CLUB_NAME}" created` : `demo club "${DEMO_CLUB_NAME}" already present`;
}
