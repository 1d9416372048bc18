import type { MigrationFn } from '../migrate';

/**
 * The standard-conditions carry of each fit as a column of its own, generated from the engine's result,
 * so personal bests are found with one indexed aggregate instead of parsing every stored result. The index
 * covers "the newest fit of each flight" with its status, carry and launch, so those reads never touch the
 * wide rows (each holds the engine's whole result, some kilobytes).
 * Note: a STORED generated column fills itself on every insert; the model does not declare it, so no
 * insert ever names it (MariaDB refuses values for generated columns).
 */
export const up: MigrationFn = async ({ context: qi }) => {
  await qi.sequelize.query(
    "ALTER TABLE fits ADD COLUMN standard_carry_m DOUBLE AS (CAST(JSON_VALUE(result, '$.standardCarry') AS DOUBLE)) STORED",
  );
  await qi.addIndex('fits', ['flight_id', 'id', 'status', 'standard_carry_m', 'launch_speed_mps', 'launch_angle_deg'], { name: 'fits_latest_summary' });
};

export const down: MigrationFn = async ({ context: qi }) => {
  await qi.removeIndex('fits', 'fits_latest_summary');
  await qi.removeColumn('fits', 'standard_carry_m');
};
