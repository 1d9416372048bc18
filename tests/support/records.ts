/**
 * Sessions, clips, flights and fits written straight into the test database, for tests that need
 * recorded throws on given days without uploading and fitting real clips.
 */
import { Fit, Flight, Session } from '../../server/models';
import type { FlightStatus } from '../../shared/schemas/flight';
import { insertClip } from '../server/clips/helpers';

/** A session on `date` with one frames clip; returns both ids. */
export async function recordSession(clubId: number, date: string, venue = `Test ground ${date}`): Promise<{ sessionId: number; clipId: number }> {
  const session = await Session.create({
    clubId,
    date,
    venue,
    notes: null,
    airTemperatureK: null,
    airPressurePa: null,
    altitudeM: null,
    relativeHumidityPct: null,
    windSpeedMps: null,
    windDirectionDeg: null,
  });
  const clip = await insertClip(clubId, session.id, `Clip of ${date}`);
  await clip.update({ status: 'ready', framesReady: true });
  return { sessionId: session.id, clipId: clip.id };
}

export interface RecordedFlight {
  athleteId: number;
  action?: string;
  status?: FlightStatus;
  attentionReason?: string | null;
  /** A fitted result to store with it (launch speed, angle, standard-conditions carry). */
  fit?: { launchSpeedMps: number; launchAngleDeg: number; standardCarryM: number };
}

/** Flights in a clip, each with its fit when given; returns their ids in order. */
export async function recordFlights(clubId: number, clipId: number, flights: RecordedFlight[]): Promise<number[]> {
  const ids: number[] = [];
  for (const f of flights) {
    const flight = await Flight.create({
      clubId,
      clipId,
      athleteProfileId: f.athleteId,
      action: f.action ?? 'punt',
      ballId: 'football-5',
      frameStart: 0,
      frameEnd: 47,
      status: f.status ?? (f.fit ? 'fitted' : 'traced'),
      attentionReason: f.attentionReason ?? null,
      notes: null,
    });
    if (f.fit) {
      await Fit.create({
        clubId,
        flightId: flight.id,
        jobId: null,
        calibrationId: null,
        model: 'quadratic',
        engineVersion: 'test',
        status: 'fitted',
        launchSpeedMps: f.fit.launchSpeedMps,
        launchAngleDeg: f.fit.launchAngleDeg,
        carryM: f.fit.standardCarryM,
        warnings: [],
        params: {},
        result: { standardCarry: f.fit.standardCarryM },
      });
    }
    ids.push(flight.id);
  }
  return ids;
}

/** `n` flights of one athlete and action. */
export function times(n: number, flight: RecordedFlight): RecordedFlight[] {
  return Array.from({ length: n }, () => ({ ...flight }));
}
