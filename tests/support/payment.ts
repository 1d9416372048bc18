/**
 * Helpers of the billing API tests: the payment fake on a free port with the app listening on another, so
 * the fake's signed webhooks reach the app as they do in production; signed events built by hand for the
 * replay, ordering and signature cases; and a purchase through the fake's hosted checkout page.
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Express } from 'express';
import request from 'supertest';
import Stripe from 'stripe';
import { afterAll, beforeAll } from 'vitest';
import { config } from '../../server/config';
import { FAKE_CARD_PAYS, startPaymentFake, type PaymentFake } from '../../server/fakes/payment';
import { ClubSubscription } from '../../server/models';
import { createClubFixture, testApp, type ApiClient, type ClubFixture } from './app';

export interface PaymentHarness {
  fake: PaymentFake;
  /** The fake's origin, e.g. `http://127.0.0.1:41234`. */
  fakeUrl: string;
  /** The app's webhook endpoint the fake delivers to. */
  webhookUrl: string;
  stop(): Promise<void>;
}

const close = (server: Server) =>
  new Promise<void>((resolve) => {
    server.close(() => resolve());
    server.closeAllConnections();
  });

/** Starts the fake and lets `app` listen, points the SDK and the fake's webhooks at each other. */
export async function startPaymentHarness(app: Express): Promise<PaymentHarness> {
  const appServer = await new Promise<Server>((resolve) => {
    const server = app.listen(0, '127.0.0.1', () => resolve(server));
  });
  const webhookUrl = `http://127.0.0.1:${(appServer.address() as AddressInfo).port}/api/v1/billing/webhook`;
  const { server, fake, port } = await startPaymentFake({ secretKey: config.payment.secretKey, webhookSecret: config.payment.webhookSecret, webhookUrl }, 0);
  config.payment.apiHost = '127.0.0.1';
  config.payment.apiPort = port;
  config.payment.apiProtocol = 'http';
  return {
    fake,
    fakeUrl: `http://127.0.0.1:${port}`,
    webhookUrl,
    stop: async () => {
      await fake.settled();
      await Promise.all([close(server), close(appServer)]);
    },
  };
}

export interface PaymentSuite {
  app: Express;
  harness: PaymentHarness;
  /** A club with a member of each role and another club's admin. */
  fixture: ClubFixture;
}

/** For one test file: the app with the payment harness and a club fixture, set up before the tests and stopped after. */
export function usePaymentSuite(): PaymentSuite {
  const suite = { app: testApp() } as PaymentSuite;
  beforeAll(async () => {
    suite.harness = await startPaymentHarness(suite.app);
    suite.fixture = await createClubFixture(suite.app);
  });
  afterAll(async () => {
    await suite.harness?.stop();
  });
  return suite;
}

const signer = new Stripe('sk_test_signer', { telemetry: false });
let counter = 0;

/** A provider event as JSON, with a fresh id unless one is given. */
export function providerEvent(type: string, object: Record<string, unknown>, options: { id?: string; created?: number } = {}): string {
  counter += 1;
  return JSON.stringify({
    id: options.id ?? `evt_test_${Date.now().toString(36)}_${counter}`,
    object: 'event',
    api_version: null,
    created: options.created ?? Math.floor(Date.now() / 1000),
    livemode: false,
    pending_webhooks: 1,
    request: { id: null, idempotency_key: null },
    type,
    data: { object },
  });
}

/** Posts a webhook body signed with `secret` (the app's by default) at `timestamp` (seconds; now by default). */
export function postWebhook(app: Express, payload: string, options: { secret?: string; timestamp?: number; signature?: string | null } = {}) {
  const header =
    options.signature !== undefined
      ? options.signature
      : signer.webhooks.generateTestHeaderString({ payload, secret: options.secret ?? config.payment.webhookSecret, timestamp: options.timestamp });
  let req = request(app).post('/api/v1/billing/webhook').set('Content-Type', 'application/json');
  if (header !== null) req = req.set('Stripe-Signature', header);
  return req.send(payload);
}

/** A provider subscription object in the shape the SDK types. */
export function subscriptionObject(fields: {
  id: string;
  customer: string;
  clubId?: number;
  status?: string;
  quantity?: number;
  lookupKey?: string;
  periodEnd?: number;
  cancelAtPeriodEnd?: boolean;
}): Record<string, unknown> {
  const end = fields.periodEnd ?? Math.floor(Date.now() / 1000) + 30 * 24 * 3600;
  return {
    id: fields.id,
    object: 'subscription',
    customer: fields.customer,
    status: fields.status ?? 'active',
    cancel_at_period_end: fields.cancelAtPeriodEnd ?? false,
    metadata: fields.clubId ? { clubId: String(fields.clubId) } : {},
    items: {
      object: 'list',
      data: [
        {
          id: `si_${fields.id}`,
          object: 'subscription_item',
          quantity: fields.quantity ?? 10,
          current_period_start: end - 30 * 24 * 3600,
          current_period_end: end,
          price: { id: 'price_test', object: 'price', lookup_key: fields.lookupKey ?? 'arcwright-fieldhouse-month', unit_amount: 700, recurring: { interval: 'month' } },
        },
      ],
    },
  };
}

/** Gives a club's row a provider customer (as starting a checkout does) so that events can name it. */
export async function linkCustomer(clubId: number, customerId: string): Promise<void> {
  await ClubSubscription.update({ providerCustomerId: customerId }, { where: { clubId } });
}

/** Starts checkout as the admin and pays on the fake's hosted page with `card`; returns the page's answer. */
export async function buyThroughCheckout(
  admin: ApiClient,
  clubId: number,
  body: { plan: string; interval: string; seats: number },
  card = FAKE_CARD_PAYS,
): Promise<{ status: number; location: string | null; html: string }> {
  const started = await admin.post(`/api/v1/clubs/${clubId}/billing/checkout`, body);
  if (started.status !== 201) throw new Error(`checkout failed: ${started.status} ${JSON.stringify(started.body)}`);
  const url = (started.body as { data: { url: string } }).data.url;
  const page = await fetch(url);
  if (page.status !== 200) throw new Error(`checkout page answered ${page.status}`);
  const paid = await fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ cardholder: 'Maren Holloway', card }).toString(),
    redirect: 'manual',
  });
  return { status: paid.status, location: paid.headers.get('location'), html: await paid.text() };
}
