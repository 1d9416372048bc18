/**
 * Asks the carry-map worker for grids. Only the newest request counts: an answer to an older one (the slider has
 * moved on) is dropped. Where the browser has no module workers, the grid is computed on the page as before.
 */
import type { CarryGrid, FlightSetup, GridAxis } from '@shared/physics';
import type { CarryMapAnswer, CarryMapRequest } from './carry-map-protocol';

export type CarryMapOutcome = { ok: true; grid: CarryGrid } | { ok: false; message: string };

export interface CarryMapClient {
  /** Resolves with the grid of the newest request, or null when a newer request replaced this one. */
  compute(setup: FlightSetup, speed: GridAxis, angleDeg: GridAxis): Promise<CarryMapOutcome | null>;
  dispose(): void;
}

export function createCarryMapClient(): CarryMapClient {
  let worker: Worker | null = null;
  let latest = 0;
  const waiting = new Map<number, (answer: CarryMapAnswer) => void>();

  function ensureWorker(): Worker | null {
    if (worker || typeof Worker === 'undefined') return worker;
    try {
      worker = new Worker(new URL('./carry-map.worker.ts', import.meta.url), { type: 'module', name: 'carry-map' });
      worker.addEventListener('message', (event: MessageEvent<CarryMapAnswer>) => {
        const resolve = waiting.get(event.data.id);
        waiting.delete(event.data.id);
        resolve?.(event.data);
      });
    } catch {
      worker = null;
    }
    return worker;
  }

  async function compute(setup: FlightSetup, speed: GridAxis, angleDeg: GridAxis): Promise<CarryMapOutcome | null> {
    const id = ++latest;
    // Note: the setup may hold Vue proxies, which cannot be posted; the engine's input is plain JSON data.
    const request: CarryMapRequest = { id, setup: JSON.parse(JSON.stringify(setup)) as FlightSetup, speed: { ...speed }, angleDeg: { ...angleDeg } };
    const target = ensureWorker();
    let answer: CarryMapAnswer;
    if (target) {
      answer = await new Promise<CarryMapAnswer>((resolve) => {
        // Older requests nobody waits for any more are answered as replaced.
        for (const [oldId, old] of waiting) old({ id: oldId, ok: false, message: '' });
        waiting.clear();
        waiting.set(id, resolve);
        target.postMessage(request);
      });
    } else {
      const { answerCarryMap } = await import('./carry-map.worker');
      answer = answerCarryMap(request);
    }
    if (answer.id !== latest) return null;
    return answer.ok ? { ok: true, grid: answer.grid } : { ok: false, message: answer.message };
  }

  function dispose(): void {
    worker?.terminate();
    worker = null;
    waiting.clear();
  }

  return { compute, dispose };
}
