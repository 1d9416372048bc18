/** The demo club through its API from a signed-in page (cookies of the page's context), for browser tests. */
import type { Page } from 'playwright-core';

export interface ApiFlight {
  id: number;
  sessionId: number;
  clipId: number;
  athleteId: number;
  athleteName: string;
  status: string;
  latestFit: { id: number; launchSpeedMps: number | null } | null;
}

/** The first club of the signed-in user (the demo club). */
export async function demoClubId(page: Page): Promise<number> {
  const me = (await (await page.request.get('/api/v1/auth/me')).json()) as { data: { memberships: { clubId: number }[] } };
  return me.data.memberships[0].clubId;
}

export async function listDemoFlights(page: Page): Promise<ApiFlight[]> {
  const answer = await page.request.get(`/api/v1/clubs/${await demoClubId(page)}/flights?pageSize=200`);
  return ((await answer.json()) as { data: ApiFlight[] }).data;
}

/** A state-changing API call with the session's CSRF token; throws on an error answer. */
export async function apiWrite(page: Page, method: 'PATCH' | 'POST' | 'PUT' | 'DELETE', path: string, body: unknown): Promise<unknown> {
  const csrf = ((await (await page.request.get('/api/v1/auth/csrf')).json()) as { data: { csrfToken: string } }).data.csrfToken;
  const res = await page.request.fetch(`/api/v1${path}`, { method, data: body ?? undefined, headers: { 'X-CSRF-Token': csrf } });
  if (!res.ok()) throw new Error(`${method} ${path} answered ${res.status()}: ${await res.text()}`);
  return res.status() === 204 ? null : res.json();
}

/** The e2e worker fits the demo flights after seeding: waits up to a minute for a fitted flight that `pick` accepts. */
export async function waitForFittedDemoFlight(page: Page, pick: (f: ApiFlight) => boolean = () => true): Promise<ApiFlight> {
  const deadline = Date.now() + 60000;
  while (Date.now() < deadline) {
    const fitted = (await listDemoFlights(page)).find((f) => f.latestFit !== null && ['fitted', 'reviewed'].includes(f.status) && pick(f));
    if (fitted) return fitted;
    await page.waitForTimeout(1000);
  }
  throw new Error('No demo flight was fitted within 60 s: see test-results/e2e-server.log for the worker.');
}

/** A fitted demo flight whose clip has frames to trace (most demo reps are seeded tracks without footage). */
export async function waitForFittedDemoFlightWithFrames(page: Page): Promise<ApiFlight> {
  const clubId = await demoClubId(page);
  const deadline = Date.now() + 90000;
  while (Date.now() < deadline) {
    const fitted = (await listDemoFlights(page)).filter((f) => f.latestFit !== null && ['fitted', 'reviewed'].includes(f.status));
    for (const flight of fitted) {
      const clip = (await (await page.request.get(`/api/v1/clubs/${clubId}/clips/${flight.clipId}`)).json()) as { data?: { framesReady?: boolean } };
      if (clip.data?.framesReady) return flight;
    }
    await page.waitForTimeout(1000);
  }
  throw new Error('No demo flight with frames was fitted within 90 s: see test-results/e2e-server.log for the worker.');
}
