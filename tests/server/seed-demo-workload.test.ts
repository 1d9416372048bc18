import { describe, expect, it } from 'vitest';
import { CoachNote, WorkloadEntry, WorkloadThreshold } from '../../server/models';
import { runSeeders } from '../../server/seeders';
import { DEMO_CLUB_NAME, DEMO_PASSWORD } from '../../server/seeders/0001-demo-club';
import type { StaffOverview } from '../../shared/schemas/overview';
import { AthleteProfile, Club, User, signIn, testApp } from '../support/app';
import { recordFlights, recordSession } from '../support/records';

describe('demo seed: workload and notes', () => {
  it('sets the time zone and thresholds, puts the youngest youth over a caution and adds notes once when run twice', async () => {
    await runSeeders();
    // This test has no clip storage, so the demo flights are not rendered: record a session of the two youths instead.
    const club = (await Club.findOne({ where: { name: DEMO_CLUB_NAME } }))!;
    const profiles = await AthleteProfile.findAll({ where: { clubId: club.id }, order: [['birthYear', 'DESC']] });
    const session = await recordSession(club.id, '2026-01-15', 'Fennick Vale lower pitch');
    const athleteUser = (await User.findOne({ where: { email: 'athlete@fennickvale.example' } }))!;
    const signedIn = profiles.find((p) => p.userId === athleteUser.id)!;
    await recordFlights(club.id, session.clipId, [profiles[0]!, signedIn].map((p) => ({ athleteId: p.id, action: 'punt' })));
    await runSeeders();
    await runSeeders();
    expect(club.timeZone).toBe('Europe/London');
    expect(await WorkloadThreshold.count({ where: { clubId: club.id } })).toBeGreaterThan(0);
    expect(await WorkloadEntry.count({ where: { clubId: club.id } })).toBe(1);
    expect(await CoachNote.count({ where: { clubId: club.id } })).toBe(5);
    expect(await CoachNote.count({ where: { clubId: club.id, visibility: 'shared' } })).toBe(3);

    const youngest = profiles[0]!;
    const coach = await signIn(testApp(), 'coach@fennickvale.example', DEMO_PASSWORD);
    const overview = await coach.get(`/api/v1/clubs/${club.id}/overview`);
    const cautions = (overview.body.data.staff as StaffOverview).cautions;
    expect(cautions.map((c) => c.athleteName)).toEqual([youngest.displayName]);

    const athlete = await signIn(testApp(), 'athlete@fennickvale.example', DEMO_PASSWORD);
    const mine = await athlete.get(`/api/v1/clubs/${club.id}/my-flights`);
    expect(mine.status).toBe(200);
    expect(mine.body.data.sharedNotes.map((n: { body: string }) => n.body)).toEqual(
      expect.arrayContaining(['Lovely high contact point on this one. Keep the plant foot this close next time.']),
    );
    expect(JSON.stringify(mine.body)).not.toContain('Release drifts late');
  });
});
