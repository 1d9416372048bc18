/** Query strings of the CSV exports. */
import { z } from 'zod';
import { unitsSchema } from './club';
import { flightListQuerySchema } from './flight';

/** `units` picks the columns' units; without it an export uses the units the member sees. */
export const exportUnitsQuerySchema = z.object({ units: unitsSchema.optional() });

/** The Flights export: the list's filters and the units. */
export const flightsExportQuerySchema = flightListQuerySchema.extend(exportUnitsQuerySchema.shape);
