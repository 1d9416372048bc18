/**
 * Athlete seats: each athlete member of a club holds one; the subscription (or the free trial) says how many
 * the club has. Invitations call `assertAthleteSeatFree` before they send or accept.
 */
import type { Transaction } from 'sequelize';
import { ApiError } from '../http/errors';
import { Membership } from '../models';
import { findSubscription } from './subscriptions';

/** Athlete members of the club (each holds one athlete seat). */
export function countAthleteSeatsUsed(clubId: number, transaction?: Transaction): Promise<number> {
  return Membership.count({ where: { clubId, role: 'athlete' }, transaction });
}

const seatWord = (n: number) => `${n} athlete seat${n === 1 ? '' : 's'}`;

/**
 * Throws SEAT_LIMIT_REACHED when one more athlete (beyond the athlete members and the pending athlete
 * invitations the caller counted) would exceed the club's paid or trial athlete seats. Inside a transaction
 * the subscription row is locked, so two invitations at once cannot both take the last seat.
 */
export async function assertAthleteSeatFree(clubId: number, pendingAthleteInvitations: number, transaction?: Transaction): Promise<void> {
  const subscription = await findSubscription(clubId, transaction, true);
  const used = (await countAthleteSeatsUsed(clubId, transaction)) + pendingAthleteInvitations;
  if (used + 1 > subscription.athleteSeats) {
    const pending = pendingAthleteInvitations > 0 ? ` (${pendingAthleteInvitations} of them by pending invitations)` : '';
    throw new ApiError(
      'SEAT_LIMIT_REACHED',
      `All ${seatWord(subscription.athleteSeats)} are taken${pending}. Add seats on Seats & billing, or remove an athlete first.`,
    );
  }
}

/** Refuses a seat count below the athletes who hold seats, naming how many to remove first. */
export function assertSeatsCoverAthletes(seats: number, used: number): void {
  if (seats < used) {
    const remove = used - seats;
    throw new ApiError(
      'SEATS_IN_USE',
      `${used} athletes hold seats, so ${seatWord(seats)} ${seats === 1 ? 'is' : 'are'} too few. Remove ${remove} athlete${remove === 1 ? '' : 's'} first (on Squad), or keep at least ${used} seats.`,
      { seats: `Keep at least ${used} seats, or remove ${remove} athlete${remove === 1 ? '' : 's'} first.` },
    );
  }
}
