/**
 * Messages between the Planner and its carry-map worker: a request carries the setup (SI, plain data) and the two
 * axes; the answer carries the grid or the engine's refusal as a sentence. `id` ties an answer to its request.
 */
import type { CarryGrid, FlightSetup, GridAxis } from '@shared/physics';

export interface CarryMapRequest {
  id: number;
  setup: FlightSetup;
  speed: GridAxis;
  angleDeg: GridAxis;
}

export type CarryMapAnswer = { id: number; ok: true; grid: CarryGrid } | { id: number; ok: false; message: string };
