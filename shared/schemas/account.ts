/**
 * Request bodies of the signed-in user's own account settings, shared by the client's form and the server.
 */
import { z } from 'zod';
import { UNITS_PREFERENCES } from '../units';

export const unitsPreferenceSchema = z.enum(UNITS_PREFERENCES, {
  error: 'Pick the units you want to see: club (follow the club), metric or imperial.',
});

export const accountUpdateSchema = z
  .object({ unitsPreference: unitsPreferenceSchema })
  .strict();
export type AccountUpdateBody = z.infer<typeof accountUpdateSchema>;
