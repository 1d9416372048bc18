/**
 * Seats & billing: what the club pays for, the provider's hosted checkout and portal, seat changes with
 * proration, cancelling at period end and resuming, and the provider's webhooks that drive the state.
 *
 * The provider is the source of truth. The return from hosted checkout changes nothing here; the signed
 * webhooks do, each applied once (event ids are kept) and only when newer than the state they would replace.
 * Seat changes, cancel and resume apply the subscription the provider answers with, which is as trustworthy
 * as its webhook and lets the screen show the result at once.
 */
import type { Transaction } from 'sequelize';
import {
  CURRENCY,
  PLANS,
  SUBSCRIPTION_STATUSES,
  findPlan,
  parsePriceLookupKey,
  priceLookupKey,
  type BillingInterval,
  type Plan,
  type PlanKey,
  type SubscriptionStatus,
} from '../../shared/billing/plans';
import type { CheckoutStartBody, ClubBilling, InvoiceSummary } from '../../shared/schemas/billing';
import { config } from '../config';
import { withTransaction } from '../db';
import { ApiError } from '../http/errors';
import { log } from '../logger';
import { BillingEvent, BillingInvoice, Club, ClubSubscription } from '../models';
import { paymentClient, Stripe } from '../payment/client';
import { assertSeatsCoverAthletes, countAthleteSeatsUsed } from './seats';
import { effectiveStatus, findSubscription, recordingBlockReason } from './subscriptions';

/** Invoices shown on the screen, newest first. */
const INVOICE_LIMIT = 24;

/** Runs a provider call; a provider that cannot be reached or refuses becomes a clear 502 (nothing changed here). */
async function provider<T>(what: string, call: () => Promise<T>): Promise<T> {
  try {
    return await call();
  } catch (err) {
    if (err instanceof Stripe.errors.StripeError) {
      log.warn(`payment provider refused to ${what}`, { type: err.type, message: err.message });
      const unreachable = err instanceof Stripe.errors.StripeConnectionError || err instanceof Stripe.errors.StripeAPIError;
      throw new ApiError(
        'PAYMENT_PROVIDER_UNAVAILABLE',
        unreachable
          ? `The payment provider did not answer, so we could not ${what}. Nothing was changed; try again in a minute.`
          : `The payment provider refused to ${what} (${err.message}). Nothing was changed; try again, or write to support if it keeps happening.`,
      );
    }
    throw err;
  }
}

const seconds = (value: number | null | undefined) => (typeof value === 'number' ? new Date(value * 1000) : null);

/** The current time cut to whole seconds, the resolution of the provider's event times. */
const nowInSeconds = () => new Date(Math.floor(Date.now() / 1000) * 1000);

function toInvoiceSummary(invoice: BillingInvoice): InvoiceSummary {
  return {
    id: invoice.providerInvoiceId,
    number: invoice.number,
    status: invoice.status,
    amountCents: invoice.amountCents,
    currency: invoice.currency,
    periodStart: invoice.periodStart?.toISOString() ?? null,
    periodEnd: invoice.periodEnd?.toISOString() ?? null,
    createdAt: invoice.issuedAt.toISOString(),
  };
}

/** Whether the row names a provider subscription that still runs (seat changes, cancel and resume need one). */
function hasLiveSubscription(row: ClubSubscription): boolean {
  return row.providerSubscriptionId !== null && !['canceled', 'incomplete_expired'].includes(row.status);
}

export async function getBilling(clubId: number): Promise<ClubBilling> {
  const row = await findSubscription(clubId);
  const seatsUsed = await countAthleteSeatsUsed(clubId);
  const invoices = await BillingInvoice.findAll({ where: { clubId }, order: [['issuedAt', 'DESC'], ['id', 'DESC']], limit: INVOICE_LIMIT });
  const plan = findPlan(row.planKey);
  const status = effectiveStatus(row);
  const reason = recordingBlockReason(row, status);
  const live = hasLiveSubscription(row);
  const nextInvoice =
    live && plan && row.billingInterval && row.currentPeriodEnd && !row.cancelAtPeriodEnd
      ? { amountCents: plan.priceCents[row.billingInterval] * row.athleteSeats, currency: CURRENCY, date: row.currentPeriodEnd.toISOString() }
      : null;
  return {
    plan: plan?.key ?? null,
    planName: plan?.name ?? null,
    interval: row.billingInterval,
    seats: row.athleteSeats,
    seatsUsed,
    includedCoachSeats: plan?.includedCoachSeats ?? Math.max(...PLANS.map((p) => p.includedCoachSeats)),
    status,
    recordingAllowed: reason === null,
    reason,
    trialEndsAt: row.trialEndsAt?.toISOString() ?? null,
    currentPeriodEnd: row.currentPeriodEnd?.toISOString() ?? null,
    cancelAtPeriodEnd: row.cancelAtPeriodEnd,
    hasProviderSubscription: live,
    nextInvoice,
    invoices: invoices.map(toInvoiceSummary),
  };
}

/**
 * The provider's price of a plan and interval, found by lookup key or created there (with its product) the
 * first time. Looked up on every checkout: a cached id would outlive a provider (or fake) that was reset.
 */
async function priceIdFor(plan: Plan, interval: BillingInterval): Promise<string> {
  const lookupKey = priceLookupKey(plan.key, interval);
  const stripe = paymentClient();
  const found = await provider('look up the plan’s price', () => stripe.prices.list({ lookup_keys: [lookupKey], active: true, limit: 1 }));
  const existing = found.data[0]?.id;
  if (existing) return existing;
  const product = await provider('set up the plan', () => stripe.products.create({ name: `Arcwright ${plan.name} (athlete seat)`, metadata: { plan: plan.key } }));
  const price = await provider('set up the plan’s price', () =>
    stripe.prices.create({
      product: product.id,
      currency: CURRENCY,
      unit_amount: plan.priceCents[interval],
      recurring: { interval },
      lookup_key: lookupKey,
      metadata: { plan: plan.key, interval },
    }),
  );
  return price.id;
}

export interface CheckoutContext {
  clubId: number;
  /** The admin starting the purchase; their e-mail goes on the provider's customer. */
  email: string;
  /** Origin the provider sends the browser back to, e.g. `http://127.0.0.1:4780`. */
  returnOrigin: string;
}

function billingPageUrl(origin: string, clubId: number, outcome?: string): string {
  const url = new URL('/billing', origin);
  url.searchParams.set('club', String(clubId));
  if (outcome) url.searchParams.set('checkout', outcome);
  return url.toString();
}

/** Starts the provider's hosted checkout for a plan, interval and athlete seat count; returns its URL. */
export async function startCheckout(ctx: CheckoutContext, body: CheckoutStartBody): Promise<{ url: string }> {
  const plan = findPlan(body.plan) as Plan;
  const row = await findSubscription(ctx.clubId);
  if (hasLiveSubscription(row)) {
    throw new ApiError(
      'CONFLICT',
      'The club already has a subscription. Change its seats, or cancel it at the end of the period, instead of buying a second one.',
    );
  }
  assertSeatsCoverAthletes(body.seats, await countAthleteSeatsUsed(ctx.clubId));
  const priceId = await priceIdFor(plan, body.interval);
  const stripe = paymentClient();
  let customerId = row.providerCustomerId;
  if (!customerId) {
    const club = await Club.findByPk(ctx.clubId, { attributes: ['id', 'name'] });
    const customer = await provider('set up the club as a customer', () =>
      stripe.customers.create({ name: club?.name ?? `Club ${ctx.clubId}`, email: ctx.email, metadata: { clubId: String(ctx.clubId) } }),
    );
    customerId = customer.id;
    row.providerCustomerId = customerId;
    await row.save();
  }
  const session = await provider('open the checkout', () =>
    stripe.checkout.sessions.create({
      mode: 'subscription',
      customer: customerId,
      client_reference_id: String(ctx.clubId),
      line_items: [{ price: priceId, quantity: body.seats }],
      success_url: billingPageUrl(ctx.returnOrigin, ctx.clubId, 'done'),
      cancel_url: billingPageUrl(ctx.returnOrigin, ctx.clubId, 'cancelled'),
      metadata: { clubId: String(ctx.clubId) },
      subscription_data: { metadata: { clubId: String(ctx.clubId) } },
    }),
  );
  if (!session.url) throw new ApiError('PAYMENT_PROVIDER_UNAVAILABLE', 'The payment provider opened no checkout page. Try again in a minute.');
  return { url: session.url };
}

async function liveRow(clubId: number, action: string): Promise<ClubSubscription & { providerSubscriptionId: string }> {
  const row = await findSubscription(clubId);
  if (!hasLiveSubscription(row)) {
    throw new ApiError('CONFLICT', `The club has no running subscription to ${action}. Pick a plan on Seats & billing first.`);
  }
  return row as ClubSubscription & { providerSubscriptionId: string };
}

/** Changes the athlete seats of the running subscription; the provider prorates the rest of the period. */
export async function changeSeats(clubId: number, seats: number): Promise<ClubBilling> {
  const row = await liveRow(clubId, 'change');
  assertSeatsCoverAthletes(seats, await countAthleteSeatsUsed(clubId));
  if (seats !== row.athleteSeats) {
    const stripe = paymentClient();
    const current = await provider('read the subscription', () => stripe.subscriptions.retrieve(row.providerSubscriptionId));
    const item = current.items.data[0];
    if (!item) throw new ApiError('PAYMENT_PROVIDER_UNAVAILABLE', 'The subscription at the payment provider has no seats line. Write to support.');
    const updated = await provider('change the seats', () =>
      stripe.subscriptions.update(row.providerSubscriptionId, { items: [{ id: item.id, quantity: seats }], proration_behavior: 'always_invoice' }),
    );
    await withTransaction((t) => applySubscription(updated, nowInSeconds(), t));
  }
  return getBilling(clubId);
}

async function setCancelAtPeriodEnd(clubId: number, cancel: boolean): Promise<ClubBilling> {
  const row = await liveRow(clubId, cancel ? 'cancel' : 'resume');
  if (row.cancelAtPeriodEnd !== cancel) {
    const stripe = paymentClient();
    const updated = await provider(cancel ? 'cancel the subscription' : 'resume the subscription', () =>
      stripe.subscriptions.update(row.providerSubscriptionId, { cancel_at_period_end: cancel }),
    );
    await withTransaction((t) => applySubscription(updated, nowInSeconds(), t));
  }
  return getBilling(clubId);
}

/** Ends the subscription when the paid period ends; until then everything works as before. */
export function cancelAtPeriodEnd(clubId: number): Promise<ClubBilling> {
  return setCancelAtPeriodEnd(clubId, true);
}

/** Withdraws a cancellation that has not taken effect yet. */
export function resumeSubscription(clubId: number): Promise<ClubBilling> {
  return setCancelAtPeriodEnd(clubId, false);
}

/** Opens the provider's billing portal (change the card, pay an open invoice); returns its URL. */
export async function openPortal(clubId: number, returnOrigin: string): Promise<{ url: string }> {
  const row = await findSubscription(clubId);
  if (!row.providerCustomerId) {
    throw new ApiError('CONFLICT', 'The club has no payment details yet. Pick a plan first; the card is entered during checkout.');
  }
  const customer = row.providerCustomerId;
  const session = await provider('open the payment details', () =>
    paymentClient().billingPortal.sessions.create({ customer, return_url: billingPageUrl(returnOrigin, clubId) }),
  );
  return { url: session.url };
}

// ── Webhooks ────────────────────────────────────────────────────────────────

function signatureError(message: string): ApiError {
  return new ApiError('WEBHOOK_SIGNATURE_INVALID', message);
}

/**
 * Verifies a webhook with the SDK's `constructEvent` on the raw body and the shared secret, then applies it
 * once. Answers what happened; throws 400s for bodies that are not JSON and for forged or stale signatures.
 */
export async function handleWebhook(rawBody: unknown, signature: string | undefined): Promise<{ received: true; duplicate: boolean; handled: boolean }> {
  if (!Buffer.isBuffer(rawBody)) {
    throw new ApiError('UNSUPPORTED_MEDIA', 'Send the webhook event as JSON with the header Content-Type: application/json.');
  }
  try {
    JSON.parse(rawBody.toString('utf8'));
  } catch {
    throw new ApiError('MALFORMED_JSON', 'The webhook body is not valid JSON. Send the event exactly as the payment provider signed it.');
  }
  if (!signature) throw signatureError('The webhook has no Stripe-Signature header; only events signed by the payment provider are accepted.');
  let event: Stripe.Event;
  try {
    event = paymentClient().webhooks.constructEvent(rawBody, signature, config.payment.webhookSecret, config.payment.webhookToleranceSeconds);
  } catch (err) {
    const stale = err instanceof Error && /tolerance/i.test(err.message);
    throw signatureError(
      stale
        ? `The webhook signature is older than ${config.payment.webhookToleranceSeconds} seconds; a replayed or delayed delivery is refused. The provider retries with a fresh signature.`
        : 'The webhook signature does not match: check that PAYMENT_WEBHOOK_SECRET is the signing secret of this endpoint.',
    );
  }

  // Fetched before the transaction: the completed checkout names the subscription, its state comes from the provider.
  let checkoutSubscription: Stripe.Subscription | null = null;
  if (event.type === 'checkout.session.completed') {
    const session = event.data.object;
    const subscriptionId = typeof session.subscription === 'string' ? session.subscription : (session.subscription?.id ?? null);
    if (subscriptionId) checkoutSubscription = await provider('read the new subscription', () => paymentClient().subscriptions.retrieve(subscriptionId));
  }

  const eventAt = new Date(event.created * 1000);
  try {
    return await withTransaction(async (transaction) => {
      const seen = await BillingEvent.findByPk(event.id, { transaction, lock: transaction.LOCK.UPDATE });
      if (seen) return { received: true as const, duplicate: true, handled: false };
      await BillingEvent.create({ id: event.id, type: event.type, providerCreatedAt: eventAt }, { transaction });
      const handled = await applyEvent(event, eventAt, checkoutSubscription, transaction);
      return { received: true as const, duplicate: false, handled };
    });
  } catch (err) {
    // The same event delivered twice at once: the primary key decides, the second delivery is a replay.
    if (err instanceof Error && err.name === 'SequelizeUniqueConstraintError') return { received: true, duplicate: true, handled: false };
    throw err;
  }
}

async function applyEvent(event: Stripe.Event, eventAt: Date, checkoutSubscription: Stripe.Subscription | null, transaction: Transaction): Promise<boolean> {
  switch (event.type) {
    case 'checkout.session.completed': {
      const session = event.data.object;
      const clubId = Number(session.client_reference_id ?? session.metadata?.clubId);
      const customerId = typeof session.customer === 'string' ? session.customer : (session.customer?.id ?? null);
      if (Number.isSafeInteger(clubId) && clubId > 0 && customerId) {
        const row = await ClubSubscription.findOne({ where: { clubId }, transaction, lock: transaction.LOCK.UPDATE });
        if (row && row.providerCustomerId === null) {
          row.providerCustomerId = customerId;
          await row.save({ transaction });
        }
      }
      return checkoutSubscription ? applySubscription(checkoutSubscription, eventAt, transaction) : false;
    }
    case 'customer.subscription.created':
    case 'customer.subscription.updated':
    case 'customer.subscription.deleted':
      return applySubscription(event.data.object, eventAt, transaction);
    case 'invoice.paid':
    case 'invoice.payment_failed':
      return recordInvoice(event.data.object, event.type === 'invoice.paid' ? 'paid' : 'failed', transaction);
    default:
      return false;
  }
}

const idOf = (value: string | { id: string } | null | undefined) => (typeof value === 'string' ? value : (value?.id ?? null));

/** The club row a provider subscription belongs to: by subscription id, then its club metadata, then its customer. */
async function rowForSubscription(sub: Stripe.Subscription, transaction: Transaction): Promise<ClubSubscription | null> {
  const lock = transaction.LOCK.UPDATE;
  const bySubscription = await ClubSubscription.findOne({ where: { providerSubscriptionId: sub.id }, transaction, lock });
  if (bySubscription) return bySubscription;
  const customerId = idOf(sub.customer);
  const clubId = Number(sub.metadata?.clubId);
  if (Number.isSafeInteger(clubId) && clubId > 0) {
    const byClub = await ClubSubscription.findOne({ where: { clubId }, transaction, lock });
    // The metadata alone is not enough: the customer must be the club's (or the club must have none yet).
    if (byClub && (byClub.providerCustomerId === null || byClub.providerCustomerId === customerId)) return byClub;
  }
  return customerId ? ClubSubscription.findOne({ where: { providerCustomerId: customerId }, transaction, lock }) : null;
}

/**
 * Applies a provider subscription to the club's row unless the row already holds a newer state, or the
 * subscription is an old, ended one the club has since replaced. Returns whether anything was applied.
 */
async function applySubscription(sub: Stripe.Subscription, eventAt: Date, transaction: Transaction): Promise<boolean> {
  const row = await rowForSubscription(sub, transaction);
  if (!row) {
    log.warn('payment webhook for a subscription no club holds', { subscription: sub.id });
    return false;
  }
  if (row.lastEventAt && eventAt.getTime() < row.lastEventAt.getTime()) return false;
  if (row.providerSubscriptionId && row.providerSubscriptionId !== sub.id && sub.status === 'canceled') return false;
  const item = sub.items.data[0];
  const priced = parsePriceLookupKey(item?.price.lookup_key);
  const legacyPeriodEnd = (sub as unknown as { current_period_end?: number }).current_period_end;
  row.providerSubscriptionId = sub.id;
  row.providerCustomerId ??= idOf(sub.customer);
  // A status this product does not know yet counts as not paid for: recording stops until the provider says active.
  row.status = (SUBSCRIPTION_STATUSES as readonly string[]).includes(sub.status) ? (sub.status as SubscriptionStatus) : 'unpaid';
  if (priced) {
    row.planKey = priced.plan.key as PlanKey;
    row.billingInterval = priced.interval;
  }
  if (item?.quantity) row.athleteSeats = item.quantity;
  row.currentPeriodEnd = seconds(item?.current_period_end ?? legacyPeriodEnd);
  row.cancelAtPeriodEnd = sub.cancel_at_period_end;
  row.lastEventAt = eventAt;
  await row.save({ transaction });
  return true;
}

/** Keeps an invoice the provider reported; a paid invoice stays paid whatever arrives after. */
async function recordInvoice(invoice: Stripe.Invoice, outcome: 'paid' | 'failed', transaction: Transaction): Promise<boolean> {
  const customerId = idOf(invoice.customer);
  const row = customerId ? await ClubSubscription.findOne({ where: { providerCustomerId: customerId }, transaction }) : null;
  if (!row) {
    log.warn('payment webhook for an invoice of a customer no club holds', { invoice: invoice.id });
    return false;
  }
  const existing = await BillingInvoice.findOne({ where: { providerInvoiceId: invoice.id }, transaction, lock: transaction.LOCK.UPDATE });
  const fields = {
    number: invoice.number ?? null,
    amountCents: outcome === 'paid' ? invoice.amount_paid : invoice.amount_due,
    currency: invoice.currency,
    periodStart: seconds(invoice.period_start),
    periodEnd: seconds(invoice.period_end),
    issuedAt: seconds(invoice.created) ?? new Date(),
  };
  if (existing) {
    if (existing.status === 'paid') return false;
    await existing.update({ ...fields, status: outcome }, { transaction });
    return true;
  }
  await BillingInvoice.create({ clubId: row.clubId, providerInvoiceId: invoice.id as string, status: outcome, ...fields }, { transaction });
  return true;
}
