/**
 * A club's subscription state as the rest of the product needs it: the free trial a new club starts on,
 * the effective status (a trial that ran out counts as ended), whether the club may record, and the summary
 * every member sees. The billing service changes the state; this module only reads it and starts trials.
 */
import type { Transaction } from 'sequelize';
import { RECORDING_STATUSES, type SubscriptionStatus } from '../../shared/billing/plans';
import type { SubscriptionSummary } from '../../shared/schemas/billing';
import { config } from '../config';
import { ApiError } from '../http/errors';
import { ClubSubscription } from '../models';

/** Creates the free trial of a new club (length and athlete seats from `config.billing`). */
export async function startTrial(clubId: number, transaction?: Transaction): Promise<ClubSubscription> {
  const trialEndsAt = new Date(Date.now() + config.billing.trialDays * 24 * 3600 * 1000);
  return ClubSubscription.create(
    {
      clubId,
      planKey: null,
      billingInterval: null,
      athleteSeats: config.billing.trialAthleteSeats,
      status: 'trialing',
      trialEndsAt,
      currentPeriodEnd: null,
      providerCustomerId: null,
      providerSubscriptionId: null,
      lastEventAt: null,
    },
    { transaction },
  );
}

/**
 * The club's subscription row. A club from before subscriptions existed gets its free trial the first time
 * anyone looks. With `lock`, the row is read FOR UPDATE inside `transaction`.
 */
export async function findSubscription(clubId: number, transaction?: Transaction, lock = false): Promise<ClubSubscription> {
  const found = await ClubSubscription.findOne({ where: { clubId }, transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (found) return found;
  try {
    return await startTrial(clubId, transaction);
  } catch (err) {
    // Two first looks at once: the unique club_id decides, the other reads the winner's row.
    if (err instanceof Error && err.name === 'SequelizeUniqueConstraintError') {
      const winner = await ClubSubscription.findOne({ where: { clubId }, transaction });
      if (winner) return winner;
    }
    throw err;
  }
}

/** The status to act on: a free trial past its end date counts as `trial_ended`. */
export function effectiveStatus(row: ClubSubscription, at = new Date()): SubscriptionStatus {
  if (row.status === 'trialing' && !row.providerSubscriptionId && row.trialEndsAt && row.trialEndsAt.getTime() <= at.getTime()) return 'trial_ended';
  return row.status;
}

const day = (date: Date) => date.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });

/** Why the club cannot record in this status, and what a club admin does about it; null when it can. */
export function recordingBlockReason(row: ClubSubscription, status = effectiveStatus(row)): string | null {
  if (RECORDING_STATUSES.includes(status)) return null;
  switch (status) {
    case 'trial_ended':
      return `The free trial ended on ${row.trialEndsAt ? day(row.trialEndsAt) : 'its last day'}. Pick a plan on Seats & billing to record again.`;
    case 'past_due':
    case 'unpaid':
      return 'The last payment did not go through. Change the card on Seats & billing to record again.';
    case 'incomplete':
    case 'incomplete_expired':
      return 'The first payment has not arrived. Pick a plan again on Seats & billing and finish the payment.';
    case 'paused':
      return 'The subscription is paused. Resume it on Seats & billing to record again.';
    default:
      return 'The subscription has ended. Pick a plan on Seats & billing to record again.';
  }
}

export function toSubscriptionSummary(row: ClubSubscription): SubscriptionSummary {
  const status = effectiveStatus(row);
  const reason = recordingBlockReason(row, status);
  return { status, recordingAllowed: reason === null, reason, trialEndsAt: row.trialEndsAt?.toISOString() ?? null };
}

export async function getSubscriptionSummary(clubId: number): Promise<SubscriptionSummary> {
  return toSubscriptionSummary(await findSubscription(clubId));
}

/**
 * Refuses new recording (sessions, uploads) when the subscription has lapsed or is unpaid. Everything already
 * recorded stays readable and exportable; only new work waits until an admin fixes the subscription.
 */
export async function assertClubCanRecord(clubId: number): Promise<void> {
  const reason = recordingBlockReason(await findSubscription(clubId));
  if (reason) {
    throw new ApiError('SUBSCRIPTION_INACTIVE', `New sessions and uploads are paused. ${reason} Everything already recorded stays readable; coaches, ask your club admin.`);
  }
}
