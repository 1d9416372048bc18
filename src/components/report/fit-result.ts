/**
 * A stored fit's `result` is the flight engine's `FitResult` as JSON (shared/physics/README.md). The API types it
 * loosely; this is the one place the client trusts it, after checking the parts every report reads.
 */
import type { FitResult } from '../../../shared/physics';

interface StoredFit {
  result: Record<string, unknown>;
}

/** The engine's result of a stored fit, or null when it lacks the launch or the flight (a fit from a foreign engine). */
export function fitResultOf(fit: StoredFit | null | undefined): FitResult | null {
  const r = fit?.result as Partial<FitResult> | undefined;
  if (!r || typeof r !== 'object') return null;
  if (!r.launch || typeof r.launch.speed !== 'number' || !r.flight || typeof r.flight.carry !== 'number' || !r.setup || !r.track) return null;
  return r as FitResult;
}

