import { describe, expect, it } from 'vitest';
import { clubRoleOf, rememberClubRoles } from '../../server/http/club-roles';

describe('club roles read with the session', () => {
  it('gives the role and profile in each club, null for another club, undefined when none were read', () => {
    const user = { id: 7 };
    rememberClubRoles(user, '[[3, "coach", null], [5, "athlete", 41]]');
    expect(clubRoleOf(user, 3)).toEqual({ id: 3, role: 'coach', athleteProfileId: null });
    expect(clubRoleOf(user, 5)).toEqual({ id: 5, role: 'athlete', athleteProfileId: 41 });
    expect(clubRoleOf(user, 9)).toBeNull();
    expect(clubRoleOf({ id: 7 }, 3)).toBeUndefined();
  });

  it('counts a user of no club as a member of none, and leaves anything malformed to the database', () => {
    const none = { id: 1 };
    rememberClubRoles(none, null);
    expect(clubRoleOf(none, 3)).toBeNull();
    for (const bad of ['not json', '[[3, "owner", null]]', '[["3", "coach", null]]', '{"3": "coach"}']) {
      const user = { id: 2 };
      rememberClubRoles(user, bad);
      expect(clubRoleOf(user, 3), bad).toBeUndefined();
    }
  });
});
