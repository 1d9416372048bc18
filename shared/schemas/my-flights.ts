/**
 * "My flights", an athlete's landing page: only their own records, never a teammate's name or number.
 */
import type { Flight } from './flight';
import type { Note } from './note';
import type { OverviewPersonalBest } from './overview';
import type { AthleteWorkload } from './workload';

/** One fitted flight of the athlete on the progress charts. */
export interface MyProgressPoint {
  flightId: number;
  day: string;
  launchSpeedMps: number | null;
  standardCarryM: number | null;
}

export interface MyFlights {
  athlete: { id: number; displayName: string };
  /** The newest flights, each with the day of its session. */
  recentFlights: (Flight & { day: string })[];
  personalBests: OverviewPersonalBest[];
  /** Fitted flights per action, oldest first. */
  progress: Record<string, MyProgressPoint[]>;
  sharedNotes: Note[];
  workload: AthleteWorkload;
}
