import { describe, expect, it } from 'vitest';
import { Invitation } from '../../server/models';
import { runSeeders } from '../../server/seeders';
import { DEMO_CLUB_NAME, DEMO_PASSWORD } from '../../server/seeders/0001-demo-club';
import { DEMO_INVITATION } from '../../server/seeders/0200-demo-invitation';
import { Club, signIn, testApp } from '../support/app';

describe('demo seed: invitation', () => {
  it('leaves one pending athlete invitation tied to a profile in the demo club when run twice', async () => {
    await runSeeders();
    await runSeeders();
    const club = await Club.findOne({ where: { name: DEMO_CLUB_NAME } });
    expect(await Invitation.count({ where: { clubId: club?.id ?? 0, email: DEMO_INVITATION.email } })).toBe(1);
    const admin = await signIn(testApp(), 'admin@fennickvale.example', DEMO_PASSWORD);
    const list = await admin.get(`/api/v1/clubs/${club?.id}/invitations`);
    expect(list.body.data).toEqual([
      expect.objectContaining({ email: DEMO_INVITATION.email, role: 'athlete', state: 'pending', athleteName: 'Juno Pelham', invitedByName: 'Maren Holloway' }),
    ]);
  });
});
