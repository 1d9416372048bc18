/**
 * A local stand-in for the payment provider, speaking the subset of its REST API that the official SDK
 * calls for Arcwright (form-encoded requests under `/v1`, a bearer secret key, JSON answers shaped like the
 * provider's objects), plus its hosted pages. State lives in memory and is lost on restart.
 *
 * - `/v1/customers`, `/v1/products`, `/v1/prices` (looked up by `lookup_keys[]`)
 * - `/v1/checkout/sessions` (mode subscription): `url` points at the hosted checkout page `GET /pay/:id`
 * - `/v1/subscriptions/:id`: read, update (quantity with proration, `cancel_at_period_end`), cancel (DELETE)
 * - `/v1/invoices?customer=`: the customer's invoices, newest first
 * - `/v1/billing_portal/sessions`: `url` points at the small card page `GET /portal/:id`
 * - `POST /_fake/subscriptions/:id/renew`: starts the next period and charges the card on file (tests and
 *   demos use it to see a renewal or a failed payment without waiting a month)
 *
 * Webhooks (`checkout.session.completed`, `customer.subscription.created|updated|deleted`, `invoice.paid`,
 * `invoice.payment_failed`) are signed with the SDK's own test-header helper and the shared webhook
 * secret, and delivered one after another to `webhookUrl`.
 */
import { randomBytes } from 'node:crypto';
import type { Server } from 'node:http';
import express, { type Express, type Request, type Response } from 'express';
import Stripe from 'stripe';
import { CURRENCY, findPlan, parsePriceLookupKey } from '../../shared/billing/plans';
import { escapeHtml } from '../http/html';

/** Test cards of the hosted pages: the first always pays, the second is always declined. */
export const FAKE_CARD_PAYS = '4782 1000 0000 0008';
export const FAKE_CARD_DECLINED = '4782 2000 0000 0006';

export interface PaymentFakeOptions {
  /** The secret key the SDK must send as bearer token. */
  secretKey: string;
  /** Signs the webhooks (`whsec_...`), shared with the app. */
  webhookSecret: string;
  /** Where webhooks go; null keeps them undelivered (they are still recorded). */
  webhookUrl: string | null;
  /** Origin of the fake's hosted pages, e.g. `http://127.0.0.1:4782`; set by `startPaymentFake` when empty. */
  publicUrl?: string;
}

type Obj = Record<string, unknown>;

interface FakeCustomer extends Obj {
  id: string;
  email: string | null;
  name: string | null;
  metadata: Record<string, string>;
  /** Credit from seat reductions, in cents (negative), taken off the next invoice. */
  balance: number;
}

interface FakeItem extends Obj {
  id: string;
  price: Obj & { id: string; unit_amount: number; recurring: { interval: 'month' | 'year' } };
  quantity: number;
  current_period_start: number;
  current_period_end: number;
}

interface FakeSubscription extends Obj {
  id: string;
  customer: string;
  status: string;
  items: { object: 'list'; data: FakeItem[] };
  current_period_start: number;
  current_period_end: number;
  cancel_at_period_end: boolean;
  canceled_at: number | null;
  metadata: Record<string, string>;
  latest_invoice: string | null;
}

interface FakeInvoice extends Obj {
  id: string;
  customer: string;
  subscription: string | null;
  status: 'paid' | 'open';
  amount_due: number;
  amount_paid: number;
  total: number;
}

interface FakeCheckout extends Obj {
  id: string;
  customer: string;
  status: 'open' | 'complete';
  success_url: string;
  cancel_url: string;
  subscription: string | null;
}

export interface Delivery {
  eventId: string;
  type: string;
  status: number | null;
}

export interface PaymentFake {
  app: Express;
  /** Resolves when every webhook queued so far has been delivered (or failed). */
  settled(): Promise<void>;
  /** Every event the fake emitted, oldest first. */
  events: Stripe.Event[];
  deliveries: Delivery[];
  setWebhookUrl(url: string | null): void;
  setPublicUrl(url: string): void;
  /** Puts a customer paying with the good card and their running subscription in place (no webhooks). */
  seedSubscription(input: SeedSubscription): void;
}

export interface SeedSubscription {
  customerId: string;
  subscriptionId: string;
  name: string;
  lookupKey: string;
  unitAmount: number;
  interval: 'month' | 'year';
  quantity: number;
  /** Period bounds in seconds. */
  periodStart: number;
  periodEnd: number;
}

const now = () => Math.floor(Date.now() / 1000);
const newId = (prefix: string) => `${prefix}_${randomBytes(12).toString('hex')}`;
const digits = (text: unknown) => (typeof text === 'string' ? text.replace(/\D/g, '') : '');

/** The end of a period that starts at `start` (seconds), one month or one year on, in UTC. */
export function periodEnd(start: number, interval: 'month' | 'year'): number {
  const date = new Date(start * 1000);
  if (interval === 'month') date.setUTCMonth(date.getUTCMonth() + 1);
  else date.setUTCFullYear(date.getUTCFullYear() + 1);
  return Math.floor(date.getTime() / 1000);
}

function euros(cents: number): string {
  return `€${(cents / 100).toFixed(2)}`;
}

function page(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(title)}</title>
<style>body{font-family:system-ui,sans-serif;background:#EEF2F1;color:#1F2933;display:grid;place-items:center;min-height:100vh;margin:0}
main{background:#fff;padding:2rem;border-radius:10px;box-shadow:0 1px 6px #0002;display:grid;gap:.9rem;width:25rem}
h1{font-size:1.2rem;margin:0}label{display:grid;gap:.25rem;font-size:.9rem}input{padding:.55rem;font:inherit;letter-spacing:.04em}
button{padding:.65rem;background:#334155;color:#fff;border:0;border-radius:5px;font:inherit;cursor:pointer}
.note{font-size:.85rem;color:#64748B;margin:0}.error{color:#B91C1C;font-weight:600;margin:0}.total{font-size:1.4rem;font-weight:700;margin:0}
a{color:#334155}</style></head><body><main>${body}</main></body></html>`;
}

export function createPaymentFake(options: PaymentFakeOptions): PaymentFake {
  const signer = new Stripe(options.secretKey, { telemetry: false });
  let webhookUrl = options.webhookUrl;
  let publicUrl = options.publicUrl ?? '';
  const customers = new Map<string, FakeCustomer>();
  const cards = new Map<string, string>();
  const products = new Map<string, Obj>();
  const prices = new Map<string, FakeItem['price']>();
  const checkouts = new Map<string, FakeCheckout>();
  const subscriptions = new Map<string, FakeSubscription>();
  const invoices = new Map<string, FakeInvoice>();
  const portals = new Map<string, Obj & { customer: string; return_url: string }>();
  const events: Stripe.Event[] = [];
  const deliveries: Delivery[] = [];
  let queue: Promise<void> = Promise.resolve();
  let invoiceCounter = 0;

  function emit(type: string, object: Obj): void {
    const event = {
      id: newId('evt'),
      object: 'event',
      api_version: null,
      created: now(),
      livemode: false,
      pending_webhooks: 1,
      request: { id: null, idempotency_key: null },
      type,
      data: { object: structuredClone(object) },
    } as unknown as Stripe.Event;
    events.push(event);
    const payload = JSON.stringify(event);
    queue = queue.then(async () => {
      const delivery: Delivery = { eventId: event.id, type, status: null };
      deliveries.push(delivery);
      if (!webhookUrl) return;
      try {
        const header = signer.webhooks.generateTestHeaderString({ payload, secret: options.webhookSecret });
        const res = await fetch(webhookUrl, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': header }, body: payload });
        delivery.status = res.status;
      } catch {
        delivery.status = null;
      }
    });
  }

  function fail(res: Response, status: number, message: string, param?: string): void {
    res.status(status).json({ error: { type: 'invalid_request_error', message, ...(param ? { param } : {}) } });
  }

  function found<T>(map: Map<string, T>, id: string, res: Response, what: string): T | null {
    const value = map.get(id);
    if (!value) fail(res, 404, `No such ${what}: '${id}'`, 'id');
    return value ?? null;
  }

  function subscriptionView(sub: FakeSubscription): FakeSubscription {
    return structuredClone(sub);
  }

  function createInvoice(sub: FakeSubscription, amount: number, reason: string, start: number, end: number): FakeInvoice {
    invoiceCounter += 1;
    const customer = customers.get(sub.customer);
    let total = amount;
    if (customer && reason === 'subscription_cycle' && customer.balance < 0) {
      const credit = Math.min(-customer.balance, total);
      total -= credit;
      customer.balance += credit;
    }
    const invoice: FakeInvoice = {
      id: newId('in'),
      object: 'invoice',
      number: `FAKE-${String(invoiceCounter).padStart(5, '0')}`,
      customer: sub.customer,
      subscription: sub.id,
      parent: { type: 'subscription_details', subscription_details: { subscription: sub.id, metadata: sub.metadata } },
      status: 'open',
      billing_reason: reason,
      currency: CURRENCY,
      amount_due: total,
      amount_paid: 0,
      total,
      period_start: start,
      period_end: end,
      created: now(),
      lines: { object: 'list', data: [{ amount: total, quantity: sub.items.data[0]?.quantity ?? 0, period: { start, end } }] },
    };
    invoices.set(invoice.id, invoice);
    sub.latest_invoice = invoice.id;
    return invoice;
  }

  /** Charges an invoice to the customer's card; emits paid or failed, and moves the subscription's status. */
  function charge(sub: FakeSubscription, invoice: FakeInvoice): boolean {
    const card = cards.get(sub.customer);
    const pays = invoice.amount_due <= 0 || card === digits(FAKE_CARD_PAYS);
    if (pays) {
      invoice.status = 'paid';
      invoice.amount_paid = invoice.amount_due;
      emit('invoice.paid', invoice);
      if (sub.status !== 'active') {
        sub.status = 'active';
        emit('customer.subscription.updated', sub);
      }
      return true;
    }
    emit('invoice.payment_failed', invoice);
    if (sub.status !== 'past_due') {
      sub.status = 'past_due';
      emit('customer.subscription.updated', sub);
    }
    return false;
  }

  function setPeriod(sub: FakeSubscription, start: number): void {
    const item = sub.items.data[0]!;
    const end = periodEnd(start, item.price.recurring.interval);
    sub.current_period_start = start;
    sub.current_period_end = end;
    item.current_period_start = start;
    item.current_period_end = end;
  }

  const app = express();
  app.disable('x-powered-by');
  // The SDK encodes nested parameters as `a[b][0]=...`, in the query of GETs and the body of POSTs.
  app.set('query parser', 'extended');

  app.get('/health', (_req, res) => {
    res.json({ status: 'ok' });
  });

  const api = express.Router();
  api.use(express.urlencoded({ extended: true }));
  api.use((req, res, next) => {
    const bearer = /^Bearer (.+)$/.exec(req.headers.authorization ?? '');
    if (bearer?.[1] !== options.secretKey) {
      res.status(401).json({ error: { type: 'invalid_request_error', message: 'Invalid API key: set PAYMENT_SECRET_KEY to the key the fake was started with.' } });
      return;
    }
    next();
  });
  const body = (req: Request) => (req.body ?? {}) as Record<string, unknown>;
  const text = (value: unknown) => (typeof value === 'string' ? value : null);
  const metadataOf = (value: unknown) =>
    Object.fromEntries(Object.entries((value ?? {}) as Record<string, unknown>).filter(([, v]) => typeof v === 'string')) as Record<string, string>;

  api.post('/customers', (req, res) => {
    const b = body(req);
    const customer: FakeCustomer = { id: newId('cus'), object: 'customer', email: text(b.email), name: text(b.name), metadata: metadataOf(b.metadata), balance: 0, created: now() };
    customers.set(customer.id, customer);
    res.json(customer);
  });
  api.get('/customers/:id', (req, res) => {
    const customer = found(customers, req.params.id, res, 'customer');
    if (customer) res.json(customer);
  });

  api.post('/products', (req, res) => {
    const b = body(req);
    const product = { id: newId('prod'), object: 'product', name: text(b.name) ?? 'Product', active: true, metadata: metadataOf(b.metadata), created: now() };
    products.set(product.id, product);
    res.json(product);
  });

  api.get('/prices', (req, res) => {
    const keys = ([] as unknown[]).concat((req.query as Obj).lookup_keys ?? []).filter((k): k is string => typeof k === 'string');
    const data = [...prices.values()].filter((p) => keys.length === 0 || keys.includes(p.lookup_key as string));
    res.json({ object: 'list', data, has_more: false, url: '/v1/prices' });
  });
  api.post('/prices', (req, res) => {
    const b = body(req);
    const recurring = (b.recurring ?? {}) as Obj;
    const interval = recurring.interval === 'year' ? 'year' : 'month';
    const unitAmount = Number(b.unit_amount);
    if (!Number.isInteger(unitAmount) || unitAmount < 0) return fail(res, 400, 'unit_amount must be a whole number of cents.', 'unit_amount');
    if (typeof b.product !== 'string' || !products.has(b.product)) return fail(res, 400, 'product must name an existing product.', 'product');
    const lookupKey = text(b.lookup_key);
    if (lookupKey && [...prices.values()].some((p) => p.lookup_key === lookupKey)) {
      return fail(res, 400, `A price with lookup_key '${lookupKey}' already exists.`, 'lookup_key');
    }
    const price = {
      id: newId('price'),
      object: 'price',
      active: true,
      product: b.product,
      currency: text(b.currency) ?? CURRENCY,
      unit_amount: unitAmount,
      lookup_key: lookupKey,
      type: 'recurring',
      recurring: { interval, interval_count: 1, usage_type: 'licensed' },
      metadata: metadataOf(b.metadata),
      created: now(),
    } as FakeItem['price'];
    prices.set(price.id, price);
    res.json(price);
  });

  api.post('/checkout/sessions', (req, res) => {
    const b = body(req);
    if (b.mode !== 'subscription') return fail(res, 400, 'This stand-in supports mode=subscription only.', 'mode');
    const customer = typeof b.customer === 'string' ? customers.get(b.customer) : undefined;
    if (!customer) return fail(res, 400, 'customer must name an existing customer.', 'customer');
    const line = (((b.line_items ?? []) as Obj[])[0] ?? {}) as Obj;
    const price = typeof line.price === 'string' ? prices.get(line.price) : undefined;
    const quantity = Number(line.quantity);
    if (!price) return fail(res, 400, 'line_items[0][price] must name an existing price.', 'line_items');
    if (!Number.isInteger(quantity) || quantity < 1) return fail(res, 400, 'line_items[0][quantity] must be a whole number of at least 1.', 'line_items');
    if (typeof b.success_url !== 'string' || typeof b.cancel_url !== 'string') return fail(res, 400, 'success_url and cancel_url are required.', 'success_url');
    const id = newId('cs');
    const session: FakeCheckout = {
      id,
      object: 'checkout.session',
      mode: 'subscription',
      customer: customer.id,
      client_reference_id: text(b.client_reference_id),
      metadata: metadataOf(b.metadata),
      subscription_metadata: metadataOf((b.subscription_data as Obj | undefined)?.metadata),
      line_items: { object: 'list', data: [{ price, quantity }] },
      amount_total: price.unit_amount * quantity,
      currency: price.currency,
      status: 'open',
      payment_status: 'unpaid',
      success_url: b.success_url,
      cancel_url: b.cancel_url,
      subscription: null,
      url: `${publicUrl}/pay/${id}`,
      created: now(),
    };
    checkouts.set(id, session);
    res.json(session);
  });
  api.get('/checkout/sessions/:id', (req, res) => {
    const session = found(checkouts, req.params.id, res, 'checkout session');
    if (session) res.json(session);
  });

  api.get('/subscriptions/:id', (req, res) => {
    const sub = found(subscriptions, req.params.id, res, 'subscription');
    if (sub) res.json(subscriptionView(sub));
  });
  api.post('/subscriptions/:id', (req, res) => {
    const sub = found(subscriptions, req.params.id, res, 'subscription');
    if (!sub) return;
    if (sub.status === 'canceled') return fail(res, 400, 'A canceled subscription cannot be updated.', 'id');
    const b = body(req);
    const item = sub.items.data[0]!;
    const change = (((b.items ?? []) as Obj[])[0] ?? null) as Obj | null;
    let invoice: FakeInvoice | null = null;
    if (change && change.quantity !== undefined) {
      const quantity = Number(change.quantity);
      if (!Number.isInteger(quantity) || quantity < 1) return fail(res, 400, 'items[0][quantity] must be a whole number of at least 1.', 'items');
      if (change.id !== undefined && change.id !== item.id) return fail(res, 400, `No such subscription item: '${String(change.id)}'`, 'items');
      const t = now();
      const span = Math.max(1, sub.current_period_end - sub.current_period_start);
      const left = Math.max(0, sub.current_period_end - t) / span;
      const prorated = Math.round((quantity - item.quantity) * item.price.unit_amount * left);
      item.quantity = quantity;
      if (prorated > 0 && b.proration_behavior !== 'none') invoice = createInvoice(sub, prorated, 'subscription_update', t, sub.current_period_end);
      else if (prorated < 0 && b.proration_behavior !== 'none') customers.get(sub.customer)!.balance += prorated;
    }
    if (b.cancel_at_period_end !== undefined) sub.cancel_at_period_end = b.cancel_at_period_end === 'true';
    if (b.metadata !== undefined) sub.metadata = { ...sub.metadata, ...metadataOf(b.metadata) };
    emit('customer.subscription.updated', sub);
    if (invoice) charge(sub, invoice);
    res.json(subscriptionView(sub));
  });
  api.delete('/subscriptions/:id', (req, res) => {
    const sub = found(subscriptions, req.params.id, res, 'subscription');
    if (!sub) return;
    sub.status = 'canceled';
    sub.canceled_at = now();
    emit('customer.subscription.deleted', sub);
    res.json(subscriptionView(sub));
  });

  api.get('/invoices', (req, res) => {
    const q = req.query as Obj;
    const data = [...invoices.values()]
      .filter((i) => (q.customer === undefined || i.customer === q.customer) && (q.subscription === undefined || i.subscription === q.subscription))
      .sort((a, b) => (b.created as number) - (a.created as number));
    res.json({ object: 'list', data, has_more: false, url: '/v1/invoices' });
  });

  api.post('/billing_portal/sessions', (req, res) => {
    const b = body(req);
    if (typeof b.customer !== 'string' || !customers.has(b.customer)) return fail(res, 400, 'customer must name an existing customer.', 'customer');
    const id = newId('bps');
    const portal = { id, object: 'billing_portal.session', customer: b.customer, return_url: text(b.return_url) ?? '', url: `${publicUrl}/portal/${id}`, created: now() };
    portals.set(id, portal);
    res.json(portal);
  });

  api.use((req, res) => fail(res, 404, `Unrecognized request URL (${req.method}: /v1${req.path}). This stand-in covers only what Arcwright calls.`));
  app.use('/v1', api);

  // The hosted checkout page.
  const checkoutPage = (session: FakeCheckout, error = ''): string => {
    const line = (session.line_items as { data: { price: FakeItem['price']; quantity: number }[] }).data[0]!;
    const lookup = parsePriceLookupKey(line.price.lookup_key as string | null);
    const planName = lookup ? findPlan(lookup.plan.key)?.name : 'Subscription';
    const per = line.price.recurring.interval === 'year' ? 'year' : 'month';
    return page(
      'Pay for Arcwright',
      `<h1>Arcwright ${escapeHtml(planName ?? '')}</h1>
<p class="note">${line.quantity} athlete seat${line.quantity === 1 ? '' : 's'} × ${euros(line.price.unit_amount)} per ${per}</p>
<p class="total" data-testid="checkout-total">${euros(line.price.unit_amount * line.quantity)} per ${per}</p>
${error ? `<p class="error" role="alert">${escapeHtml(error)}</p>` : ''}
<form method="post" action="/pay/${escapeHtml(session.id)}" style="display:grid;gap:.75rem" aria-label="Card details">
<label>Name on card <input name="cardholder" autocomplete="off" required></label>
<label>Card number <input name="card" inputmode="numeric" autocomplete="off" required></label>
<button type="submit">Pay and start the subscription</button>
</form>
<p class="note">Local payment stand-in: no money moves. Card ${FAKE_CARD_PAYS} pays; card ${FAKE_CARD_DECLINED} is declined.</p>
<p class="note"><a href="${escapeHtml(session.cancel_url)}">Go back without paying</a></p>`,
    );
  };

  app.get('/pay/:id', (req, res) => {
    const session = checkouts.get(req.params.id);
    if (!session) return void res.status(404).type('html').send(page('Not found', '<h1>This checkout link is unknown</h1><p class="note">Start the purchase again from Seats &amp; billing.</p>'));
    if (session.status === 'complete') return void res.redirect(303, session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id));
    res.type('html').send(checkoutPage(session));
  });

  app.post('/pay/:id', express.urlencoded({ extended: false }), (req, res) => {
    const session = checkouts.get(req.params.id);
    if (!session) return void res.status(404).type('html').send(page('Not found', '<h1>This checkout link is unknown</h1>'));
    if (session.status === 'complete') return void res.redirect(303, session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id));
    const card = digits((req.body as Obj).card);
    if (card === digits(FAKE_CARD_DECLINED)) {
      return void res.status(402).type('html').send(checkoutPage(session, 'The card was declined. Nothing was charged; use another card.'));
    }
    if (card !== digits(FAKE_CARD_PAYS)) {
      return void res.status(400).type('html').send(checkoutPage(session, `This stand-in knows two cards only: use ${FAKE_CARD_PAYS} to pay.`));
    }
    cards.set(session.customer, card);
    const line = (session.line_items as { data: { price: FakeItem['price']; quantity: number }[] }).data[0]!;
    const start = now();
    const sub: FakeSubscription = {
      id: newId('sub'),
      object: 'subscription',
      customer: session.customer,
      status: 'active',
      items: {
        object: 'list',
        data: [{ id: newId('si'), object: 'subscription_item', price: line.price, quantity: line.quantity, current_period_start: start, current_period_end: start }],
      },
      current_period_start: start,
      current_period_end: start,
      cancel_at_period_end: false,
      canceled_at: null,
      metadata: session.subscription_metadata as Record<string, string>,
      latest_invoice: null,
      created: start,
    };
    setPeriod(sub, start);
    subscriptions.set(sub.id, sub);
    const invoice = createInvoice(sub, line.price.unit_amount * line.quantity, 'subscription_create', start, sub.current_period_end);
    invoice.status = 'paid';
    invoice.amount_paid = invoice.amount_due;
    session.status = 'complete';
    session.payment_status = 'paid';
    session.subscription = sub.id;
    emit('customer.subscription.created', sub);
    emit('invoice.paid', invoice);
    emit('checkout.session.completed', session);
    res.redirect(303, session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id));
  });

  // The billing portal: shows the card on file and takes a new one; a new good card pays what is open.
  const portalPage = (portal: Obj & { customer: string; return_url: string }, message = '', error = ''): string => {
    const card = cards.get(portal.customer);
    const customer = customers.get(portal.customer);
    return page(
      'Payment details',
      `<h1>Payment details</h1>
<p class="note">${escapeHtml(customer?.name ?? customer?.email ?? '')}</p>
<p data-testid="card-on-file">Card on file: ${card ? `•••• ${card.slice(-4)}` : 'none'}</p>
${message ? `<p role="status">${escapeHtml(message)}</p>` : ''}${error ? `<p class="error" role="alert">${escapeHtml(error)}</p>` : ''}
<form method="post" action="/portal/${escapeHtml(String(portal.id))}/card" style="display:grid;gap:.75rem" aria-label="New card">
<label>New card number <input name="card" inputmode="numeric" autocomplete="off" required></label>
<button type="submit">Use this card</button>
</form>
<p class="note">Local payment stand-in. Card ${FAKE_CARD_PAYS} pays; card ${FAKE_CARD_DECLINED} is declined.</p>
<p class="note"><a href="${escapeHtml(portal.return_url)}">Back to Arcwright</a></p>`,
    );
  };

  app.get('/portal/:id', (req, res) => {
    const portal = portals.get(req.params.id);
    if (!portal) return void res.status(404).type('html').send(page('Not found', '<h1>This link is unknown</h1><p class="note">Open the payment details again from Seats &amp; billing.</p>'));
    res.type('html').send(portalPage(portal));
  });

  app.post('/portal/:id/card', express.urlencoded({ extended: false }), (req, res) => {
    const portal = portals.get(req.params.id);
    if (!portal) return void res.status(404).type('html').send(page('Not found', '<h1>This link is unknown</h1>'));
    const card = digits((req.body as Obj).card);
    if (card !== digits(FAKE_CARD_PAYS) && card !== digits(FAKE_CARD_DECLINED)) {
      return void res.status(400).type('html').send(portalPage(portal, '', `This stand-in knows two cards only: ${FAKE_CARD_PAYS} and ${FAKE_CARD_DECLINED}.`));
    }
    cards.set(portal.customer, card);
    let paid = 0;
    for (const invoice of invoices.values()) {
      if (invoice.customer !== portal.customer || invoice.status !== 'open' || !invoice.subscription) continue;
      const sub = subscriptions.get(invoice.subscription);
      if (sub && sub.status !== 'canceled' && charge(sub, invoice)) paid += 1;
    }
    res.type('html').send(portalPage(portal, paid > 0 ? 'Card saved, and the open invoice is paid.' : 'Card saved.'));
  });

  app.post('/_fake/subscriptions/:id/renew', (req, res) => {
    const sub = found(subscriptions, req.params.id, res, 'subscription');
    if (!sub) return;
    if (sub.status === 'canceled') return fail(res, 400, 'A canceled subscription does not renew.', 'id');
    if (sub.cancel_at_period_end) {
      sub.status = 'canceled';
      sub.canceled_at = now();
      emit('customer.subscription.deleted', sub);
      return void res.json(subscriptionView(sub));
    }
    setPeriod(sub, Math.max(now(), sub.current_period_end));
    emit('customer.subscription.updated', sub);
    const item = sub.items.data[0]!;
    charge(sub, createInvoice(sub, item.price.unit_amount * item.quantity, 'subscription_cycle', sub.current_period_start, sub.current_period_end));
    res.json(subscriptionView(sub));
  });

  return {
    app,
    settled: async () => {
      let seen: Promise<void> | null = null;
      while (seen !== queue) {
        seen = queue;
        await queue;
      }
    },
    events,
    deliveries,
    setWebhookUrl: (url) => {
      webhookUrl = url;
    },
    setPublicUrl: (url) => {
      publicUrl = url;
    },
    seedSubscription: (input) => {
      if (subscriptions.has(input.subscriptionId)) return;
      customers.set(input.customerId, { id: input.customerId, object: 'customer', email: null, name: input.name, metadata: {}, balance: 0, created: input.periodStart });
      cards.set(input.customerId, digits(FAKE_CARD_PAYS));
      let price = [...prices.values()].find((p) => p.lookup_key === input.lookupKey);
      if (!price) {
        const product = { id: newId('prod'), object: 'product', name: `Arcwright ${input.lookupKey}`, active: true, metadata: {}, created: input.periodStart };
        products.set(product.id, product);
        price = {
          id: newId('price'),
          object: 'price',
          active: true,
          product: product.id,
          currency: CURRENCY,
          unit_amount: input.unitAmount,
          lookup_key: input.lookupKey,
          type: 'recurring',
          recurring: { interval: input.interval },
          metadata: {},
        } as FakeItem['price'];
        prices.set(price.id, price);
      }
      const item: FakeItem = { id: newId('si'), object: 'subscription_item', price, quantity: input.quantity, current_period_start: input.periodStart, current_period_end: input.periodEnd };
      subscriptions.set(input.subscriptionId, {
        id: input.subscriptionId,
        object: 'subscription',
        customer: input.customerId,
        status: 'active',
        items: { object: 'list', data: [item] },
        current_period_start: input.periodStart,
        current_period_end: input.periodEnd,
        cancel_at_period_end: false,
        canceled_at: null,
        metadata: {},
        latest_invoice: null,
        created: input.periodStart,
      });
    },
  };
}

/** Starts the fake on host:port (0 picks a free port); resolves once it listens. */
export function startPaymentFake(options: PaymentFakeOptions, port: number, host = '127.0.0.1'): Promise<{ server: Server; fake: PaymentFake; port: number }> {
  const fake = createPaymentFake(options);
  return new Promise((resolve, reject) => {
    const server = fake.app.listen(port, host);
    server.once('listening', () => {
      const address = server.address();
      const actual = typeof address === 'object' && address ? address.port : port;
      if (!options.publicUrl) fake.setPublicUrl(`http://${host}:${actual}`);
      resolve({ server, fake, port: actual });
    });
    server.once('error', (err: NodeJS.ErrnoException) =>
      reject(err.code === 'EADDRINUSE' ? new Error(`Port ${port} is in use: stop the other process or set PAYMENT_FAKE_PORT.`) : err),
    );
  });
}
