/**
 * Who may use the Seats & billing routes: club admins only; a coach or athlete of the club gets 403, another
 * club's admin 404, anyone signed out 401. A completeness check fails when a billing route has no row here.
 */
import { describe, expect, it } from 'vitest';
import { billingRouter, billingWebhookRouter } from '../../../server/routes/billing';
import type { ApiClient, ClubFixture } from '../../support/app';
import { routesOf } from '../../support/routes';
import { usePaymentSuite } from '../../support/payment';

type Who = 'admin' | 'coach' | 'athlete' | 'outsider' | 'anonymous';
type Method = 'get' | 'post' | 'patch';

interface Case {
  method: Method;
  route: string;
  path: (f: ClubFixture) => string;
  body?: unknown;
  expect: Record<Who, number>;
}

const billing = (f: ClubFixture) => `/api/v1/clubs/${f.clubId}/billing`;
// A trial club has no provider subscription: its admin passes the authorization and hears 409 from the rules.
const ADMIN_ONLY = (adminStatus: number): Record<Who, number> => ({ admin: adminStatus, coach: 403, athlete: 403, outsider: 404, anonymous: 401 });

const CASES: Case[] = [
  { method: 'get', route: '/clubs/:clubId/billing', path: billing, expect: ADMIN_ONLY(200) },
  { method: 'post', route: '/clubs/:clubId/billing/checkout', path: (f) => `${billing(f)}/checkout`, body: { plan: 'sideline', interval: 'month', seats: 3 }, expect: ADMIN_ONLY(201) },
  { method: 'patch', route: '/clubs/:clubId/billing/seats', path: (f) => `${billing(f)}/seats`, body: { seats: 4 }, expect: ADMIN_ONLY(409) },
  { method: 'post', route: '/clubs/:clubId/billing/cancel', path: (f) => `${billing(f)}/cancel`, expect: ADMIN_ONLY(409) },
  { method: 'post', route: '/clubs/:clubId/billing/resume', path: (f) => `${billing(f)}/resume`, expect: ADMIN_ONLY(409) },
  { method: 'post', route: '/clubs/:clubId/billing/portal', path: (f) => `${billing(f)}/portal`, expect: ADMIN_ONLY(201) },
];

const suite = usePaymentSuite();

describe('billing authorization matrix', () => {
  it('covers every route of the billing router when a route is added', () => {
    expect([...new Set(CASES.map((c) => `${c.method} ${c.route}`))].sort()).toEqual(routesOf(billingRouter).sort());
  });

  it('keeps the webhook the one public billing route', () => {
    expect(routesOf(billingWebhookRouter)).toEqual(['post /billing/webhook']);
  });

  const whos: Who[] = ['coach', 'athlete', 'outsider', 'anonymous', 'admin'];
  for (const c of CASES) {
    for (const who of whos) {
      it(`answers ${c.expect[who]} to ${c.method.toUpperCase()} ${c.route} when the caller is ${who}`, async () => {
        const client: ApiClient = suite.fixture[who];
        const res = await client.request(c.method, c.path(suite.fixture), c.body);
        expect(res.status, JSON.stringify(res.body)).toBe(c.expect[who]);
        const codes: Record<number, string> = { 401: 'UNAUTHENTICATED', 403: 'FORBIDDEN', 404: 'NOT_FOUND' };
        if (codes[res.status]) expect(res.body.error.code).toBe(codes[res.status]);
      });
    }
  }

  it('answers another club’s admin exactly as for a club that does not exist', async () => {
    const foreign = await suite.fixture.outsider.get(billing(suite.fixture));
    const missing = await suite.fixture.outsider.get('/api/v1/clubs/999999999/billing');
    expect(foreign.status).toBe(404);
    expect(foreign.body).toEqual(missing.body);
  });
});
