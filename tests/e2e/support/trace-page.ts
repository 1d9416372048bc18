/** Moving about the Trace screen in browser tests: the frame in view and image pixels on the page. */
import { expect } from 'vitest';
import type { Page } from 'playwright-core';

export interface Point {
  x: number;
  y: number;
}

/** Screen position of an image pixel, from the viewer's current zoom and pan (its data-view attribute). */
export async function imageToPage(page: Page, p: Point): Promise<Point> {
  const viewer = page.getByTestId('trace-viewer');
  const view = (await viewer.getAttribute('data-view')) ?? '1,0,0';
  const [scale, ox, oy] = view.split(',').map(Number);
  const box = await viewer.boundingBox();
  if (!box) throw new Error('The frame viewer is not on screen.');
  return { x: box.x + p.x * scale + ox, y: box.y + p.y * scale + oy };
}

export async function waitForFrame(page: Page): Promise<void> {
  await page.locator('[data-testid="trace-viewer"][data-ready="true"]').waitFor({ timeout: 15000 });
}

export async function goToFrame(page: Page, frame: number): Promise<void> {
  const box = page.getByTestId('frame-jump').locator('input');
  await box.fill(String(frame));
  await box.press('Enter');
  await expect.poll(async () => (await page.getByTestId('frame-now').textContent())?.trim().split(' ')[0]).toBe(String(frame));
  await waitForFrame(page);
}
