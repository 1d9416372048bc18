/**
 * The payment webhook: signatures checked with the SDK on the raw body, replays and out-of-order events,
 * bodies that are not JSON, and the whole purchase through the fake's hosted checkout (declined, then paid).
 */
import { describe, expect, it } from 'vitest';
import { FAKE_CARD_DECLINED } from '../../../server/fakes/payment';
import { BillingEvent, BillingInvoice, ClubSubscription } from '../../../server/models';
import { signUp } from '../../support/app';
import { buyThroughCheckout, linkCustomer, postWebhook, providerEvent, subscriptionObject, usePaymentSuite } from '../../support/payment';

const suite = usePaymentSuite();
const { app } = suite;

const rowOf = async (clubId: number) => (await ClubSubscription.findOne({ where: { clubId } }))!;

/** A club whose row names a provider customer, ready for hand-made events. */
async function linkedClub(): Promise<{ clubId: number; customer: string }> {
  const owner = await signUp(app, { clubName: 'Webhook Club' });
  const customer = `cus_test_${owner.clubId}`;
  await linkCustomer(owner.clubId, customer);
  return { clubId: owner.clubId, customer };
}

describe('billing webhook: signatures and bodies', () => {
  it('answers 400 and changes nothing when the signature was made with another secret', async () => {
    const { clubId, customer } = await linkedClub();
    const payload = providerEvent('customer.subscription.updated', subscriptionObject({ id: `sub_forged_${clubId}`, customer, clubId, quantity: 99 }));
    const res = await postWebhook(app, payload, { secret: 'whsec_someone_else' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('WEBHOOK_SIGNATURE_INVALID');
    expect(res.body.error.message).toMatch(/signature does not match/);
    const row = await rowOf(clubId);
    expect(row.status).toBe('trialing');
    expect(row.providerSubscriptionId).toBeNull();
    expect(await BillingEvent.count({ where: { id: JSON.parse(payload).id } })).toBe(0);
  });

  it('answers 400 when the signature is older than the tolerance', async () => {
    const { clubId, customer } = await linkedClub();
    const payload = providerEvent('customer.subscription.updated', subscriptionObject({ id: `sub_stale_${clubId}`, customer, clubId }));
    const res = await postWebhook(app, payload, { timestamp: Math.floor(Date.now() / 1000) - 3600 });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/older than 300 seconds/);
    expect((await rowOf(clubId)).status).toBe('trialing');
  });

  it('answers 400 when the Stripe-Signature header is missing', async () => {
    const res = await postWebhook(app, providerEvent('invoice.paid', { id: 'in_x' }), { signature: null });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/no Stripe-Signature header/);
  });

  it('answers a clear 400 when the body is not JSON', async () => {
    const res = await postWebhook(app, '{"id": "evt_1", "type": ', {});
    expect(res.status).toBe(400);
    expect(res.body.error).toEqual({ code: 'MALFORMED_JSON', message: expect.stringMatching(/webhook body is not valid JSON/) });
  });

  it('answers 415 when the body is not sent as application/json', async () => {
    const { default: request } = await import('supertest');
    const res = await request(app).post('/api/v1/billing/webhook').set('Content-Type', 'text/plain').send('hello');
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/Content-Type: application\/json/);
  });

  it('needs no session and no CSRF token when the signature is right', async () => {
    const res = await postWebhook(app, providerEvent('customer.created', { id: 'cus_unrelated' }));
    expect(res.status).toBe(200);
    expect(res.body.data).toEqual({ received: true, duplicate: false, handled: false });
  });
});

describe('billing webhook: idempotency and order', () => {
  it('applies an event once and answers 2xx to its replay without changing anything', async () => {
    const { clubId, customer } = await linkedClub();
    const sub = `sub_replay_${clubId}`;
    const payload = providerEvent('customer.subscription.created', subscriptionObject({ id: sub, customer, clubId, quantity: 14 }));
    const first = await postWebhook(app, payload);
    expect(first.status).toBe(200);
    expect(first.body.data.handled).toBe(true);
    const afterFirst = await rowOf(clubId);
    expect(afterFirst).toMatchObject({ status: 'active', athleteSeats: 14, planKey: 'fieldhouse', billingInterval: 'month', providerSubscriptionId: sub });

    // Someone changes the row in between; a replay must not put the old event's values back.
    await afterFirst.update({ athleteSeats: 20 });
    const replay = await postWebhook(app, payload);
    expect(replay.status).toBe(200);
    expect(replay.body.data).toEqual({ received: true, duplicate: true, handled: false });
    expect((await rowOf(clubId)).athleteSeats).toBe(20);
  });

  it('keeps the newer state when an older subscription event arrives after it', async () => {
    const { clubId, customer } = await linkedClub();
    const sub = `sub_order_${clubId}`;
    const t = Math.floor(Date.now() / 1000);
    const newer = providerEvent('customer.subscription.updated', subscriptionObject({ id: sub, customer, clubId, quantity: 18, cancelAtPeriodEnd: true }), { created: t });
    const older = providerEvent('customer.subscription.created', subscriptionObject({ id: sub, customer, clubId, quantity: 12 }), { created: t - 60 });
    expect((await postWebhook(app, newer)).status).toBe(200);
    const late = await postWebhook(app, older);
    expect(late.status).toBe(200);
    expect(late.body.data.handled).toBe(false);
    expect(await rowOf(clubId)).toMatchObject({ athleteSeats: 18, cancelAtPeriodEnd: true });
  });

  it('ignores a late event of an ended subscription once the club has a newer one', async () => {
    const { clubId, customer } = await linkedClub();
    const t = Math.floor(Date.now() / 1000);
    await postWebhook(app, providerEvent('customer.subscription.created', subscriptionObject({ id: `sub_new_${clubId}`, customer, clubId, quantity: 9 }), { created: t }));
    const stale = providerEvent('customer.subscription.deleted', subscriptionObject({ id: `sub_old_${clubId}`, customer, clubId, status: 'canceled' }), { created: t + 1 });
    expect((await postWebhook(app, stale)).status).toBe(200);
    expect(await rowOf(clubId)).toMatchObject({ status: 'active', providerSubscriptionId: `sub_new_${clubId}` });
  });

  it('keeps a paid invoice paid when its failure event arrives late', async () => {
    const { clubId, customer } = await linkedClub();
    const invoice = { id: `in_late_${clubId}`, object: 'invoice', customer, number: 'T-1', status: 'paid', amount_due: 2100, amount_paid: 2100, currency: 'eur', period_start: 1, period_end: 2, created: Math.floor(Date.now() / 1000) };
    expect((await postWebhook(app, providerEvent('invoice.paid', invoice))).status).toBe(200);
    expect((await postWebhook(app, providerEvent('invoice.payment_failed', { ...invoice, status: 'open', amount_paid: 0 }))).status).toBe(200);
    const rows = await BillingInvoice.findAll({ where: { clubId } });
    expect(rows.map((r) => [r.status, r.amountCents])).toEqual([['paid', 2100]]);
  });

  it('answers 2xx to event types it does not handle', async () => {
    const res = await postWebhook(app, providerEvent('payout.created', { id: 'po_1', object: 'payout' }));
    expect(res.status).toBe(200);
    expect(res.body.data.handled).toBe(false);
  });
});

describe('billing: purchase through the hosted checkout', () => {
  it('leaves the trial untouched when the card is declined', async () => {
    const declined = await buyThroughCheckout(suite.fixture.admin, suite.fixture.clubId, { plan: 'sideline', interval: 'month', seats: 6 }, FAKE_CARD_DECLINED);
    expect(declined.status).toBe(402);
    expect(declined.html).toContain('The card was declined');
    await suite.harness.fake.settled();
    const res = await suite.fixture.admin.get(`/api/v1/clubs/${suite.fixture.clubId}/billing`);
    expect(res.body.data).toMatchObject({ status: 'trialing', plan: null, seats: 10, hasProviderSubscription: false, invoices: [] });
  });

  it('keeps the trial when the payment went through but no webhook arrived (the redirect alone changes nothing)', async () => {
    const other = await signUp(app, { clubName: 'Withheld Webhooks Club' });
    suite.harness.fake.setWebhookUrl(null);
    try {
      const paid = await buyThroughCheckout(other.client, other.clubId, { plan: 'sideline', interval: 'month', seats: 4 });
      expect(paid.status).toBe(303);
      await suite.harness.fake.settled();
    } finally {
      suite.harness.fake.setWebhookUrl(suite.harness.webhookUrl);
    }
    const res = await other.client.get(`/api/v1/clubs/${other.clubId}/billing`);
    expect(res.body.data).toMatchObject({ status: 'trialing', plan: null, hasProviderSubscription: false });
  });

  it('becomes active with the bought seats once the provider’s webhooks arrive', async () => {
    const delivered = suite.harness.fake.deliveries.length;
    const paid = await buyThroughCheckout(suite.fixture.admin, suite.fixture.clubId, { plan: 'grandstand', interval: 'year', seats: 25 });
    expect(paid.status).toBe(303);
    expect(paid.location).toMatch(new RegExp(`/billing\\?club=${suite.fixture.clubId}&checkout=done$`));
    await suite.harness.fake.settled();
    expect(suite.harness.fake.deliveries.slice(delivered).map((d) => [d.type, d.status])).toEqual([
      ['customer.subscription.created', 200],
      ['invoice.paid', 200],
      ['checkout.session.completed', 200],
    ]);
    const res = await suite.fixture.admin.get(`/api/v1/clubs/${suite.fixture.clubId}/billing`);
    expect(res.status).toBe(200);
    expect(res.body.data).toMatchObject({
      plan: 'grandstand',
      planName: 'Grandstand',
      interval: 'year',
      seats: 25,
      seatsUsed: 1,
      includedCoachSeats: 12,
      status: 'active',
      recordingAllowed: true,
      cancelAtPeriodEnd: false,
      hasProviderSubscription: true,
      nextInvoice: { amountCents: 25 * 11000, currency: 'eur', date: expect.any(String) },
    });
    expect(res.body.data.invoices).toEqual([expect.objectContaining({ status: 'paid', amountCents: 25 * 11000, currency: 'eur' })]);
  });

  it('refuses a second checkout while the subscription runs', async () => {
    const res = await suite.fixture.admin.post(`/api/v1/clubs/${suite.fixture.clubId}/billing/checkout`, { plan: 'sideline', interval: 'month', seats: 5 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/already has a subscription/);
  });
});
