/**
 * Request bodies and response shapes of the Seats & billing endpoints, shared by the client's forms and the
 * server's routes.
 */
import { z } from 'zod';
import {
  BILLING_INTERVALS,
  MAX_ATHLETE_SEATS,
  MIN_ATHLETE_SEATS,
  PLAN_KEYS,
  type BillingInterval,
  type PlanKey,
  type SubscriptionStatus,
} from '../billing/plans';

export const athleteSeatsSchema = z
  .number({ error: 'Enter the number of athlete seats as a number, such as 12.' })
  .int({ error: 'Enter a whole number of athlete seats, such as 12.' })
  .min(MIN_ATHLETE_SEATS, { error: `A subscription needs at least ${MIN_ATHLETE_SEATS} athlete seat; to stop paying, cancel at the end of the period instead.` })
  .max(MAX_ATHLETE_SEATS, { error: `Pick at most ${MAX_ATHLETE_SEATS} athlete seats; for a larger club, write to us for a federation agreement.` });

export const checkoutStartSchema = z
  .object({
    plan: z.enum(PLAN_KEYS, { error: `Pick a plan: ${PLAN_KEYS.join(', ')}.` }),
    interval: z.enum(BILLING_INTERVALS, { error: 'Pick monthly or yearly billing.' }),
    seats: athleteSeatsSchema,
  })
  .strict();
export type CheckoutStartBody = z.infer<typeof checkoutStartSchema>;

export const seatChangeSchema = z.object({ seats: athleteSeatsSchema }).strict();
export type SeatChangeBody = z.infer<typeof seatChangeSchema>;

/** What every member of a club sees about the subscription (for the banner and the disabled buttons). */
export interface SubscriptionSummary {
  status: SubscriptionStatus;
  /** Whether new sessions and uploads are accepted. */
  recordingAllowed: boolean;
  /** When recording is refused: why, and how to fix it. */
  reason: string | null;
  trialEndsAt: string | null;
}

export interface InvoiceSummary {
  id: string;
  number: string | null;
  status: 'paid' | 'open' | 'failed';
  amountCents: number;
  currency: string;
  periodStart: string | null;
  periodEnd: string | null;
  createdAt: string;
}

export interface ClubBilling {
  plan: PlanKey | null;
  planName: string | null;
  interval: BillingInterval | null;
  /** Paid (or trial) athlete seats. */
  seats: number;
  /** Athlete members of the club, each holding one seat. */
  seatsUsed: number;
  includedCoachSeats: number;
  status: SubscriptionStatus;
  recordingAllowed: boolean;
  reason: string | null;
  trialEndsAt: string | null;
  currentPeriodEnd: string | null;
  cancelAtPeriodEnd: boolean;
  /** Whether the club has a subscription at the provider (seat changes, cancel, resume and the portal need one). */
  hasProviderSubscription: boolean;
  /** The next charge as far as the plan and seats tell (prorations of the current period come on top). */
  nextInvoice: { amountCents: number; currency: string; date: string } | null;
  invoices: InvoiceSummary[];
}
