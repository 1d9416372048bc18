/**
 * The staff's Overview: the start of a coach's day. Response shapes only (the Overview takes no body).
 */
import type { AthleteCaution } from './workload';

/** A flight in "needs attention", with the reason and where to fix it (the clip's Trace screen). */
export interface OverviewAttentionItem {
  flightId: number;
  clipId: number;
  sessionId: number;
  athleteName: string;
  action: string;
  reason: string;
  updatedAt: string;
}

/** A clip still being cut into frames, with the progress of its job in per cent (null before it starts). */
export interface OverviewProcessingClip {
  clipId: number;
  sessionId: number;
  label: string;
  progress: number | null;
}

/** One fitted rep of the latest session. */
export interface OverviewRep {
  flightId: number;
  athleteName: string;
  action: string;
  launchSpeedMps: number | null;
  launchAngleDeg: number | null;
  standardCarryM: number | null;
}

/** The athlete and action of the latest session whose launch speed varied least (at least 3 fitted reps). */
export interface OverviewConsistency {
  athleteName: string;
  action: string;
  reps: number;
  launchSpeedMeanMps: number;
  /** Sample standard deviation of the launch speed, m/s. */
  launchSpeedSdMps: number;
  launchAngleSdDeg: number;
}

export interface OverviewLatestSession {
  id: number;
  date: string;
  venue: string;
  flightCount: number;
  fittedCount: number;
  /** The rep with the longest standard-conditions carry. */
  best: OverviewRep | null;
  mostConsistent: OverviewConsistency | null;
}

/** An athlete's best standard-conditions carry for an action (their personal best). */
export interface OverviewPersonalBest {
  athleteId: number;
  athleteName: string;
  action: string;
  flightId: number;
  standardCarryM: number;
  day: string;
}

/** The one thing the Overview offers first: upload into today's session, or start one. */
export type OverviewPrimaryAction = { kind: 'upload'; sessionId: number; venue: string } | { kind: 'new-session' };

export interface StaffOverview {
  today: string;
  attention: { total: number; items: OverviewAttentionItem[] };
  processing: OverviewProcessingClip[];
  latestSession: OverviewLatestSession | null;
  cautions: AthleteCaution[];
  personalBests: OverviewPersonalBest[];
  primaryAction: OverviewPrimaryAction;
}
