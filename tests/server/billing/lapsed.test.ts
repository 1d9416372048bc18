/**
 * A lapsed or unpaid subscription: new sessions and uploads are refused with how to fix it, while the
 * sessions, flights and exports already recorded stay readable. A trial that ran out counts as lapsed.
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ClubSubscription } from '../../../server/models';
import { createClubFixture, testApp, type ClubFixture } from '../../support/app';
import { linkCustomer, postWebhook, providerEvent, subscriptionObject } from '../../support/payment';
import { clipRowCount, clubPath, createSession, flightClip, upload, useTestStorage, type TestStorage } from '../clips/helpers';
import { testWorker } from '../clips/worker-helper';

const app = testApp();
let fx: ClubFixture;
let store: TestStorage;
let dir: string;
let video: string;
let sessionId: number;
let flightId: number;

beforeAll(async () => {
  store = await useTestStorage();
  dir = await mkdtemp(join(tmpdir(), 'arcwright-lapsed-'));
  fx = await createClubFixture(app);
  sessionId = await createSession(fx.coach, fx.clubId);
  ({ videoPath: video } = await flightClip(dir));
  const uploaded = await upload(fx.coach, fx.clubId, sessionId, { video });
  if (uploaded.status !== 201) throw new Error(`upload failed: ${uploaded.status} ${JSON.stringify(uploaded.body)}`);
  await testWorker().drain();
  const flight = await fx.coach.post(clubPath(fx, `/clips/${uploaded.body.data.clip.id}/flights`), { athleteId: fx.otherAthleteProfileId, action: 'punt', ballId: 'football-5' });
  if (flight.status !== 201) throw new Error(`flight create failed: ${flight.status} ${JSON.stringify(flight.body)}`);
  flightId = flight.body.data.id;

  // The provider reports the renewal unpaid.
  const customer = `cus_lapsed_${fx.clubId}`;
  await linkCustomer(fx.clubId, customer);
  const res = await postWebhook(app, providerEvent('customer.subscription.updated', subscriptionObject({ id: `sub_lapsed_${fx.clubId}`, customer, clubId: fx.clubId, status: 'past_due' })));
  if (res.status !== 200) throw new Error(`webhook failed: ${res.status}`);
});

afterAll(async () => {
  await store.remove();
  await rm(dir, { recursive: true, force: true });
});

const PAST_DUE_MESSAGE =
  'New sessions and uploads are paused. The last payment did not go through. Change the card on Seats & billing to record again. Everything already recorded stays readable; coaches, ask your club admin.';

describe('lapsed subscription', () => {
  it('refuses a new session with how to fix it', async () => {
    const res = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2026-11-02', venue: 'Lower pitch', conditions: { airTemperatureK: 285, altitudeM: 0 } });
    expect(res.status).toBe(402);
    expect(res.body.error).toEqual({ code: 'SUBSCRIPTION_INACTIVE', message: PAST_DUE_MESSAGE });
  });

  it('refuses an upload and keeps nothing of it', async () => {
    const before = await clipRowCount(fx.clubId);
    const filesBefore = await store.files();
    const res = await upload(fx.coach, fx.clubId, sessionId, { video });
    expect(res.status).toBe(402);
    expect(res.body.error.code).toBe('SUBSCRIPTION_INACTIVE');
    expect(await clipRowCount(fx.clubId)).toEqual(before);
    expect(await store.files()).toEqual(filesBefore);
  });

  it('still serves the sessions and flights lists, a flight and its CSV export', async () => {
    const sessions = await fx.coach.get(clubPath(fx, '/sessions'));
    expect(sessions.status).toBe(200);
    expect(sessions.body.data.map((s: { id: number }) => s.id)).toContain(sessionId);
    const flights = await fx.athlete.get(clubPath(fx, '/flights'));
    expect(flights.status).toBe(200);
    const all = await fx.admin.get(clubPath(fx, '/flights'));
    expect(all.body.data.map((f: { id: number }) => f.id)).toContain(flightId);
    expect((await fx.coach.get(clubPath(fx, `/flights/${flightId}`))).status).toBe(200);
    const csv = await fx.coach.get(clubPath(fx, `/flights/${flightId}/track.csv`));
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
  });

  it('tells every member on the club profile that recording is paused', async () => {
    const res = await fx.athlete.get(clubPath(fx, ''));
    expect(res.body.data.subscription).toMatchObject({ status: 'past_due', recordingAllowed: false, reason: expect.stringMatching(/Change the card on Seats & billing/) });
  });

  it('records again once the provider reports the subscription paid', async () => {
    const customer = `cus_lapsed_${fx.clubId}`;
    const paid = providerEvent('customer.subscription.updated', subscriptionObject({ id: `sub_lapsed_${fx.clubId}`, customer, clubId: fx.clubId, status: 'active' }), {
      created: Math.floor(Date.now() / 1000) + 1,
    });
    expect((await postWebhook(app, paid)).status).toBe(200);
    const res = await fx.coach.post(clubPath(fx, '/sessions'), { date: '2026-11-03', venue: 'Lower pitch', conditions: { airTemperatureK: 285, altitudeM: 0 } });
    expect(res.status).toBe(201);
  });
});

describe('trial that ran out', () => {
  it('refuses a new session, saying the trial ended and how to pick a plan', async () => {
    const club = await createClubFixture(app);
    await ClubSubscription.update({ trialEndsAt: new Date(Date.UTC(2026, 0, 5)) }, { where: { clubId: club.clubId } });
    const res = await club.coach.post(`/api/v1/clubs/${club.clubId}/sessions`, { date: '2026-11-02', venue: 'Lower pitch' });
    expect(res.status).toBe(402);
    expect(res.body.error.message).toBe(
      'New sessions and uploads are paused. The free trial ended on 5 Jan 2026. Pick a plan on Seats & billing to record again. Everything already recorded stays readable; coaches, ask your club admin.',
    );
    const billing = await club.admin.get(`/api/v1/clubs/${club.clubId}/billing`);
    expect(billing.body.data).toMatchObject({ status: 'trial_ended', recordingAllowed: false });
  });
});
