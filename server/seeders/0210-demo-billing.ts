/**
 * The demo club's subscription: Fieldhouse, monthly, 15 athlete seats (most of them free), active, with
 * four months of paid invoices. The same customer and subscription exist on the local payment fake, so
 * the Seats & billing screen works after `npm start`.
 *
 * Idempotent: a demo club whose row already names the demo subscription keeps what it has (its admin may
 * have changed the seats since); invoices are added only when missing.
 */
import type { Transaction } from 'sequelize';
import { findPlan } from '../../shared/billing/plans';
import { BillingInvoice, ClubSubscription } from '../models';
import { startTrial } from '../services/subscriptions';
import { demoClub } from './0002-demo-flights';
import { DEMO_BILLING, demoInvoices, demoPeriod } from './demo/billing';

export async function seed(transaction: Transaction): Promise<string> {
  const club = await demoClub(transaction);
  if (!club) return 'no demo club, nothing to do';
  const row = (await ClubSubscription.findOne({ where: { clubId: club.id }, transaction })) ?? (await startTrial(club.id, transaction));
  let changed = false;
  if (row.providerSubscriptionId !== DEMO_BILLING.subscriptionId) {
    await row.update(
      {
        planKey: DEMO_BILLING.plan,
        billingInterval: DEMO_BILLING.interval,
        athleteSeats: DEMO_BILLING.seats,
        status: 'active',
        currentPeriodEnd: demoPeriod().end,
        cancelAtPeriodEnd: false,
        providerCustomerId: DEMO_BILLING.customerId,
        providerSubscriptionId: DEMO_BILLING.subscriptionId,
        lastEventAt: null,
      },
      { transaction },
    );
    changed = true;
  }
  const price = findPlan(DEMO_BILLING.plan)!.priceCents[DEMO_BILLING.interval];
  let added = 0;
  for (const invoice of demoInvoices()) {
    const existing = await BillingInvoice.findOne({ where: { providerInvoiceId: invoice.id }, transaction });
    if (existing) continue;
    await BillingInvoice.create(
      {
        clubId: club.id,
        providerInvoiceId: invoice.id,
        number: invoice.number,
        status: 'paid',
        amountCents: invoice.seats * price,
        currency: 'eur',
        periodStart: invoice.periodStart,
        periodEnd: invoice.periodEnd,
        issuedAt: invoice.periodStart,
      },
      { transaction },
    );
    added += 1;
  }
  return `${changed ? 'demo subscription set' : 'demo subscription present'}, ${added} invoice(s) added`;
}
