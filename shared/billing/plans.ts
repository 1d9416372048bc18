/**
 * The plans Arcwright sells, defined once for server, client and the payment fake. Each plan is sold per
 * athlete seat and includes a few coach seats; prices are whole cents (euro) per athlete seat and interval.
 * The server creates the matching products and prices at the payment provider, found again by `lookupKey`.
 */

export const BILLING_INTERVALS = ['month', 'year'] as const;
export type BillingInterval = (typeof BILLING_INTERVALS)[number];

export const PLAN_KEYS = ['sideline', 'fieldhouse', 'grandstand'] as const;
export type PlanKey = (typeof PLAN_KEYS)[number];

export interface Plan {
  key: PlanKey;
  name: string;
  /** One line for the plan picker. */
  summary: string;
  /** Coach (and admin) seats that come with the plan at no charge. */
  includedCoachSeats: number;
  /** Price of one athlete seat, in cents, per interval. */
  priceCents: Record<BillingInterval, number>;
}

export const CURRENCY = 'eur';

export const PLANS: readonly Plan[] = [
  {
    key: 'sideline',
    name: 'Sideline',
    summary: 'For a squad finding its range: tracing, fits and the planner.',
    includedCoachSeats: 2,
    priceCents: { month: 400, year: 4000 },
  },
  {
    key: 'fieldhouse',
    name: 'Fieldhouse',
    summary: 'For a club with several squads: every report and export, more coach seats.',
    includedCoachSeats: 5,
    priceCents: { month: 700, year: 7000 },
  },
  {
    key: 'grandstand',
    name: 'Grandstand',
    summary: 'For academies and federations: the largest staff allowance.',
    includedCoachSeats: 12,
    priceCents: { month: 1100, year: 11000 },
  },
];

/** Fewest and most athlete seats one subscription may hold; more than the maximum is a typing slip, not a club. */
export const MIN_ATHLETE_SEATS = 1;
export const MAX_ATHLETE_SEATS = 500;

export function findPlan(key: string | null | undefined): Plan | null {
  return PLANS.find((plan) => plan.key === key) ?? null;
}

/** The provider's lookup key of a plan's price for one interval, e.g. `arcwright-fieldhouse-year`. */
export function priceLookupKey(key: PlanKey, interval: BillingInterval): string {
  return `arcwright-${key}-${interval}`;
}

/** The plan and interval a lookup key names, or null for a price this product did not create. */
export function parsePriceLookupKey(lookupKey: string | null | undefined): { plan: Plan; interval: BillingInterval } | null {
  const match = /^arcwright-([a-z]+)-(month|year)$/.exec(lookupKey ?? '');
  if (!match) return null;
  const plan = findPlan(match[1]);
  return plan ? { plan, interval: match[2] as BillingInterval } : null;
}

/** Subscription states as the provider reports them, plus `trial_ended` for a free trial that ran out. */
export const SUBSCRIPTION_STATUSES = [
  'trialing',
  'trial_ended',
  'active',
  'past_due',
  'unpaid',
  'incomplete',
  'incomplete_expired',
  'canceled',
  'paused',
] as const;
export type SubscriptionStatus = (typeof SUBSCRIPTION_STATUSES)[number];

/** States in which the club may record (create sessions, upload clips). */
export const RECORDING_STATUSES: readonly SubscriptionStatus[] = ['trialing', 'active'];

export const SUBSCRIPTION_STATUS_LABELS: Record<SubscriptionStatus, string> = {
  trialing: 'Free trial',
  trial_ended: 'Trial ended',
  active: 'Active',
  past_due: 'Payment overdue',
  unpaid: 'Unpaid',
  incomplete: 'Awaiting first payment',
  incomplete_expired: 'First payment never arrived',
  canceled: 'Ended',
  paused: 'Paused',
};
