import express, { Router, type Request } from 'express';
import { checkoutStartSchema, seatChangeSchema, type CheckoutStartBody, type SeatChangeBody } from '../../shared/schemas/billing';
import { config } from '../config';
import { clubAccess, clubOf, publicRoute } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { cancelAtPeriodEnd, changeSeats, getBilling, handleWebhook, openPortal, resumeSubscription, startCheckout } from '../services/billing';

/** The origin the provider's hosted pages send the browser back to: PUBLIC_URL, else the host that asked. */
function returnOrigin(req: Request): string {
  if (config.publicUrl) return new URL(config.publicUrl).origin;
  return `${req.protocol}://${req.get('host') ?? `${config.host}:${config.port}`}`;
}

/**
 * The provider's webhook endpoint. No session and no CSRF token: the signature over the raw body is the
 * check, so this router is mounted before the JSON body parser and the session of the API router.
 */
export const billingWebhookRouter = Router();

billingWebhookRouter.post('/billing/webhook', publicRoute, express.raw({ type: 'application/json', limit: '1mb' }), async (req, res) => {
  const signature = req.headers['stripe-signature'];
  res.json({ data: await handleWebhook(req.body, Array.isArray(signature) ? signature[0] : signature) });
});

/** Seats & billing of a club: club admins only. */
export const billingRouter = Router();

billingRouter.get('/clubs/:clubId/billing', clubAccess('admin'), async (req, res) => {
  res.json({ data: await getBilling(clubOf(req).id) });
});

billingRouter.post('/clubs/:clubId/billing/checkout', clubAccess('admin'), validate(checkoutStartSchema), async (req, res) => {
  const ctx = { clubId: clubOf(req).id, email: (req.user as Express.User).email, returnOrigin: returnOrigin(req) };
  res.status(201).json({ data: await startCheckout(ctx, req.body as CheckoutStartBody) });
});

billingRouter.patch('/clubs/:clubId/billing/seats', clubAccess('admin'), validate(seatChangeSchema), async (req, res) => {
  res.json({ data: await changeSeats(clubOf(req).id, (req.body as SeatChangeBody).seats) });
});

billingRouter.post('/clubs/:clubId/billing/cancel', clubAccess('admin'), async (req, res) => {
  res.json({ data: await cancelAtPeriodEnd(clubOf(req).id) });
});

billingRouter.post('/clubs/:clubId/billing/resume', clubAccess('admin'), async (req, res) => {
  res.json({ data: await resumeSubscription(clubOf(req).id) });
});

billingRouter.post('/clubs/:clubId/billing/portal', clubAccess('admin'), async (req, res) => {
  res.status(201).json({ data: await openPortal(clubOf(req).id, returnOrigin(req)) });
});
