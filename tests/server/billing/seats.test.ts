/**
 * Seats and the subscription's life: the trial a sign-up starts on, seat counts refused (0, negative, absurd,
 * below the athletes in use), a prorated seat change, cancel at period end and resume, the billing portal,
 * and the seat check invitations call.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { config } from '../../../server/config';
import { assertAthleteSeatFree } from '../../../server/services/seats';
import { ClubSubscription } from '../../../server/models';
import { addMember, signIn, signUp, testApp, type SignedUp } from '../../support/app';
import { buyThroughCheckout, startPaymentHarness, type PaymentHarness } from '../../support/payment';

const app = testApp();
let harness: PaymentHarness;
let club: SignedUp;

beforeAll(async () => {
  harness = await startPaymentHarness(app);
  club = await signUp(app, { clubName: 'Seat Count Club' });
  for (let i = 0; i < 3; i += 1) await addMember(club.clubId, 'athlete', `Seat Athlete ${i + 1}`);
  const paid = await buyThroughCheckout(club.client, club.clubId, { plan: 'fieldhouse', interval: 'month', seats: 5 });
  if (paid.status !== 303) throw new Error(`purchase failed: ${paid.status}`);
  await harness.fake.settled();
});

afterAll(async () => {
  await harness.stop();
});

const billingPath = () => `/api/v1/clubs/${club.clubId}/billing`;

describe('trial on sign-up', () => {
  it('starts a new club on a free trial of the configured days and athlete seats', async () => {
    const fresh = await signUp(app, { clubName: 'Fresh Trial Club' });
    // Created with the club in the sign-up transaction, not on the first look at it.
    expect(await ClubSubscription.findOne({ where: { clubId: fresh.clubId } })).toMatchObject({ status: 'trialing', athleteSeats: config.billing.trialAthleteSeats });
    const res = await fresh.client.get(`/api/v1/clubs/${fresh.clubId}/billing`);
    expect(res.status).toBe(200);
    expect(res.body.data).toMatchObject({ status: 'trialing', plan: null, seats: config.billing.trialAthleteSeats, seatsUsed: 0, recordingAllowed: true, invoices: [], nextInvoice: null });
    const days = (Date.parse(res.body.data.trialEndsAt) - Date.now()) / (24 * 3600 * 1000);
    expect(days).toBeGreaterThan(config.billing.trialDays - 0.01);
    expect(days).toBeLessThanOrEqual(config.billing.trialDays);
  });

  it('shows every member the subscription summary on the club profile', async () => {
    const member = await addMember(club.clubId, 'coach', 'Summary Coach');
    const coach = await signIn(app, member.email);
    const res = await coach.get(`/api/v1/clubs/${club.clubId}`);
    expect(res.body.data.subscription).toEqual({ status: 'active', recordingAllowed: true, reason: null, trialEndsAt: expect.any(String) });
  });
});

describe('seat counts', () => {
  it.each([
    [0, /at least 1 athlete seat/],
    [-3, /at least 1 athlete seat/],
    [100000, /at most 500 athlete seats/],
    [2.5, /whole number of athlete seats/],
    ['twelve', /as a number/],
  ])('refuses %s seats with a clear message', async (seats, message) => {
    const res = await club.client.patch(`${billingPath()}/seats`, { seats });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields.seats).toMatch(message);
    expect((await ClubSubscription.findOne({ where: { clubId: club.clubId } }))!.athleteSeats).toBe(5);
  });

  it('refuses to go below the athletes in use and names how many to remove first', async () => {
    const res = await club.client.patch(`${billingPath()}/seats`, { seats: 2 });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('SEATS_IN_USE');
    expect(res.body.error.message).toBe('3 athletes hold seats, so 2 athlete seats are too few. Remove 1 athlete first (on Squad), or keep at least 3 seats.');
    expect((await ClubSubscription.findOne({ where: { clubId: club.clubId } }))!.athleteSeats).toBe(5);
  });

  it('refuses a checkout for fewer seats than the athletes in use', async () => {
    const crowded = await signUp(app, { clubName: 'Crowded Trial Club' });
    for (let i = 0; i < 2; i += 1) await addMember(crowded.clubId, 'athlete');
    const res = await crowded.client.post(`/api/v1/clubs/${crowded.clubId}/billing/checkout`, { plan: 'sideline', interval: 'month', seats: 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/^2 athletes hold seats, so 1 athlete seat is too few/);
  });

  it('changes the seats with a prorated invoice at the provider', async () => {
    const res = await club.client.patch(`${billingPath()}/seats`, { seats: 8 });
    expect(res.status).toBe(200);
    expect(res.body.data).toMatchObject({ seats: 8, seatsUsed: 3, status: 'active', nextInvoice: { amountCents: 8 * 700 } });
    await harness.fake.settled();
    const after = await club.client.get(billingPath());
    expect(after.body.data.seats).toBe(8);
    const [proration] = after.body.data.invoices;
    // Three more seats for (almost) the whole month: just under 3 × €7.00.
    expect(proration.status).toBe('paid');
    expect(proration.amountCents).toBeGreaterThan(2090);
    expect(proration.amountCents).toBeLessThanOrEqual(2100);
  });
});

describe('athlete seat check for invitations', () => {
  it('throws SEAT_LIMIT_REACHED naming the count and the fix when the seats are full', async () => {
    // 8 seats: 3 athletes + 4 pending invitations leave one seat; with 5 pending there is none.
    await expect(assertAthleteSeatFree(club.clubId, 4)).resolves.toBeUndefined();
    await expect(assertAthleteSeatFree(club.clubId, 5)).rejects.toMatchObject({
      code: 'SEAT_LIMIT_REACHED',
      status: 409,
      message: 'All 8 athlete seats are taken (5 of them by pending invitations). Add seats on Seats & billing, or remove an athlete first.',
    });
  });

  it('counts the trial’s seats on a new club', async () => {
    const trial = await signUp(app, { clubName: 'Seat Trial Club' });
    for (let i = 0; i < config.billing.trialAthleteSeats; i += 1) await addMember(trial.clubId, 'athlete');
    await expect(assertAthleteSeatFree(trial.clubId, 0)).rejects.toMatchObject({
      message: `All ${config.billing.trialAthleteSeats} athlete seats are taken. Add seats on Seats & billing, or remove an athlete first.`,
    });
  });
});

describe('cancel, resume and the portal', () => {
  it('cancels at the end of the period and resumes before it ends', async () => {
    const cancelled = await club.client.post(`${billingPath()}/cancel`);
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.data).toMatchObject({ status: 'active', cancelAtPeriodEnd: true, nextInvoice: null, recordingAllowed: true });
    const resumed = await club.client.post(`${billingPath()}/resume`);
    expect(resumed.status).toBe(200);
    expect(resumed.body.data).toMatchObject({ status: 'active', cancelAtPeriodEnd: false, nextInvoice: { amountCents: 8 * 700 } });
    await harness.fake.settled();
    expect((await club.client.get(billingPath())).body.data.cancelAtPeriodEnd).toBe(false);
  });

  it('refuses cancel, resume and seat changes when the club has no subscription yet', async () => {
    const trial = await signUp(app, { clubName: 'No Subscription Club' });
    for (const [method, path, body] of [
      ['post', 'cancel', undefined],
      ['post', 'resume', undefined],
      ['patch', 'seats', { seats: 4 }],
    ] as const) {
      const res = await trial.client.request(method, `/api/v1/clubs/${trial.clubId}/billing/${path}`, body);
      expect(res.status).toBe(409);
      expect(res.body.error.message).toMatch(/no running subscription .* Pick a plan on Seats & billing first\./);
    }
  });

  it('opens the provider’s portal page for changing the card', async () => {
    const res = await club.client.post(`${billingPath()}/portal`);
    expect(res.status).toBe(201);
    expect(res.body.data.url.startsWith(`${harness.fakeUrl}/portal/`)).toBe(true);
    const page = await fetch(res.body.data.url);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Card on file: •••• 0008');
  });

  it('refuses the portal before any checkout, saying where the card is entered', async () => {
    const trial = await signUp(app, { clubName: 'No Card Club' });
    const res = await trial.client.post(`/api/v1/clubs/${trial.clubId}/billing/portal`);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe('The club has no payment details yet. Pick a plan first; the card is entered during checkout.');
  });

  it('refuses a checkout with an unknown plan', async () => {
    const trial = await signUp(app, { clubName: 'Plan Picker Club' });
    const res = await trial.client.post(`/api/v1/clubs/${trial.clubId}/billing/checkout`, { plan: 'platinum', interval: 'month', seats: 3 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.plan).toBe('Pick a plan: sideline, fieldhouse, grandstand.');
  });
});
