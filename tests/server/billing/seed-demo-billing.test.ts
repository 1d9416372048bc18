/**
 * The demo club's subscription: active with free athlete seats and a paid invoice history, unchanged by a
 * second run, and known to the payment fake so that a seat change works right after `npm start`.
 */
import { describe, expect, it } from 'vitest';
import { withTransaction } from '../../../server/db';
import { BillingInvoice, ClubSubscription } from '../../../server/models';
import { DEMO_PASSWORD, seed as seedClub } from '../../../server/seeders/0001-demo-club';
import { demoClub } from '../../../server/seeders/0002-demo-flights';
import { seed as seedBilling } from '../../../server/seeders/0210-demo-billing';
import { demoFakeSubscription } from '../../../server/seeders/demo/billing';
import { signIn } from '../../support/app';
import { usePaymentSuite } from '../../support/payment';

const suite = usePaymentSuite();

describe('demo billing seed', () => {
  it('gives the demo club an active subscription with free seats and four paid invoices, once', async () => {
    // Another test file may have seeded the demo club already: the second run must change nothing either way.
    await withTransaction(seedClub);
    await withTransaction(seedBilling);
    expect(await withTransaction(seedBilling)).toBe('demo subscription present, 0 invoice(s) added');
    const club = (await withTransaction(demoClub))!;
    expect(await ClubSubscription.count({ where: { clubId: club.id } })).toBe(1);
    expect(await BillingInvoice.count({ where: { clubId: club.id } })).toBe(4);

    const admin = await signIn(suite.app, 'admin@fennickvale.example', DEMO_PASSWORD);
    const res = await admin.get(`/api/v1/clubs/${club.id}/billing`);
    expect(res.status).toBe(200);
    expect(res.body.data).toMatchObject({ plan: 'fieldhouse', interval: 'month', status: 'active', seats: 15, seatsUsed: 1, hasProviderSubscription: true });
    expect(res.body.data.invoices.map((i: { status: string; amountCents: number }) => [i.status, i.amountCents])).toEqual([
      ['paid', 10500],
      ['paid', 10500],
      ['paid', 8400],
      ['paid', 8400],
    ]);
    expect(res.body.data.nextInvoice).toEqual({ amountCents: 10500, currency: 'eur', date: expect.any(String) });
  });

  it('changes the demo club’s seats through the fake that holds its subscription', async () => {
    suite.harness.fake.seedSubscription(demoFakeSubscription());
    const club = (await withTransaction(demoClub))!;
    const admin = await signIn(suite.app, 'admin@fennickvale.example', DEMO_PASSWORD);
    const res = await admin.patch(`/api/v1/clubs/${club.id}/billing/seats`, { seats: 16 });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.data.seats).toBe(16);
    await suite.harness.fake.settled();
    expect((await admin.get(`/api/v1/clubs/${club.id}/billing`)).body.data.seats).toBe(16);
  });
});
