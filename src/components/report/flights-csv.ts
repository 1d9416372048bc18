/**
 * The Flights screen's CSV export: what the filters show, written by the same builder as the server's exports
 * (shared/exports/flights.ts, where the columns are documented), in the units the member sees.
 */
export { flightCsvColumns, flightsCsv, type FlightCsvRow } from '@shared/exports/flights';

/** File name of an export, e.g. `arcwright-flights-2026-03-14.csv` (the local day of the download). */
export function flightsCsvName(now: Date): string {
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `arcwright-flights-${now.getFullYear()}-${m}-${d}.csv`;
}
