/** The signed-in user's own settings (display units). */
import type { AccountUpdateBody } from '../../shared/schemas/account';
import type { Me } from '../../shared/types/api';
import { effectiveUnits, type UnitSystem } from '../../shared/units';
import { ApiError } from '../http/errors';
import { Club, User } from '../models';
import { loadMe } from './auth';

export async function updateAccount(userId: number, body: AccountUpdateBody): Promise<Me> {
  const user = await User.findByPk(userId);
  if (!user) throw new ApiError('UNAUTHENTICATED', 'Your account could not be found; sign in again.');
  await user.update({ unitsPreference: body.unitsPreference });
  const me = await loadMe(userId);
  if (!me) throw new ApiError('UNAUTHENTICATED', 'Your account could not be found; sign in again.');
  return me;
}

/** The units a member sees in a club: their own choice, or the club's setting. */
export async function unitsFor(userId: number, clubId: number): Promise<UnitSystem> {
  const [user, club] = await Promise.all([
    User.findByPk(userId, { attributes: ['id', 'unitsPreference'] }),
    Club.findByPk(clubId, { attributes: ['id', 'units'] }),
  ]);
  return effectiveUnits(user?.unitsPreference, club?.units);
}
