import type { MigrationFn } from '../migrate';

/**
 * Indexes the staff Overview reads through on every visit: a club's flights by their last change (the
 * personal bests' change marker takes the newest in one index step instead of reading all of the club's
 * flights) and a club's clips by status (the clips still processing).
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.addIndex('flights', ['club_id', 'updated_at'], { name: 'flights_club_updated' });
  await qi.addIndex('clips', ['club_id', 'status'], { name: 'clips_club_status' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.removeIndex('clips', 'clips_club_status');
  await qi.removeIndex('flights', 'flights_club_updated');
};
