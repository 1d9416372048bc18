/**
 * The demo club's subscription, shared by its seeder (the club's row and invoice history) and the local
 * payment fake (which holds the same customer and subscription, so seat changes and the portal work after
 * `npm start`). Periods are calendar months anchored on the 1st, computed from the day it runs.
 */
import { findPlan, priceLookupKey, type BillingInterval, type PlanKey } from '../../../shared/billing/plans';
import type { SeedSubscription } from '../../fakes/payment';

export const DEMO_BILLING = {
  customerId: 'cus_demo_fennickvale',
  subscriptionId: 'sub_demo_fennickvale',
  plan: 'fieldhouse' as PlanKey,
  interval: 'month' as BillingInterval,
  /** Athlete seats now; the club had fewer in its first months (see `history`). */
  seats: 15,
  lookupKey: priceLookupKey('fieldhouse', 'month'),
  customerName: 'Fennick Vale Sporting Club',
};

/** The first of the month `offset` months from the month of `at`, UTC. */
function monthStart(at: Date, offset: number): Date {
  return new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth() + offset, 1));
}

/** The current paid period: this month. */
export function demoPeriod(at = new Date()): { start: Date; end: Date } {
  return { start: monthStart(at, 0), end: monthStart(at, 1) };
}

export interface DemoInvoice {
  id: string;
  number: string;
  seats: number;
  periodStart: Date;
  periodEnd: Date;
}

/** Four paid monthly invoices, oldest first: 12 seats for two months, then 15. */
export function demoInvoices(at = new Date()): DemoInvoice[] {
  return [-3, -2, -1, 0].map((offset, i) => {
    const periodStart = monthStart(at, offset);
    const stamp = `${periodStart.getUTCFullYear()}${String(periodStart.getUTCMonth() + 1).padStart(2, '0')}`;
    return { id: `in_demo_fennickvale_${stamp}`, number: `FVSC-${stamp}`, seats: i < 2 ? 12 : DEMO_BILLING.seats, periodStart, periodEnd: monthStart(at, offset + 1) };
  });
}

/** The demo subscription as the payment fake holds it, for the current period. */
export function demoFakeSubscription(at = new Date()): SeedSubscription {
  const period = demoPeriod(at);
  return {
    customerId: DEMO_BILLING.customerId,
    subscriptionId: DEMO_BILLING.subscriptionId,
    name: DEMO_BILLING.customerName,
    lookupKey: DEMO_BILLING.lookupKey,
    unitAmount: findPlan(DEMO_BILLING.plan)!.priceCents[DEMO_BILLING.interval],
    interval: DEMO_BILLING.interval,
    quantity: DEMO_BILLING.seats,
    periodStart: Math.floor(period.start.getTime() / 1000),
    periodEnd: Math.floor(period.end.getTime() / 1000),
  };
}
