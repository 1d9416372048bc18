/**
 * The Planner's carry map off the main thread: a grid of 61 speeds × the map's angles is a few thousand flights of
 * the shared engine (tens of milliseconds, more on a slow machine), which would hold up a slider on the page.
 */
import { isPhysicsError, plannerGrid } from '@shared/physics';
import type { CarryMapAnswer, CarryMapRequest } from './carry-map-protocol';

/** The grid of one request, or the engine's refusal as a sentence for the screen. */
export function answerCarryMap(request: CarryMapRequest): CarryMapAnswer {
  try {
    return { id: request.id, ok: true, grid: plannerGrid(request.setup, request.speed, request.angleDeg) };
  } catch (error) {
    const message = isPhysicsError(error) || error instanceof Error ? error.message : 'This launch cannot be flown: change the settings.';
    return { id: request.id, ok: false, message };
  }
}

// Note: this module is also imported by the page when workers are unavailable; only a worker scope listens.
if (typeof window === 'undefined' && typeof self !== 'undefined') {
  self.addEventListener('message', (event: MessageEvent<CarryMapRequest>) => {
    self.postMessage(answerCarryMap(event.data));
  });
}
