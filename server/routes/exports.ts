/**
 * CSV downloads of flights: the Flights list (its filters in the query) and a session's flights. Every member may
 * export; an athlete's files hold only their own flights. `?units=metric|imperial` picks the columns' units,
 * otherwise the member's own display units are used. (A flight's track: `GET …/flights/:flightId/track.csv`.)
 */
import { Router } from 'express';
import { exportUnitsQuerySchema, flightsExportQuerySchema } from '../../shared/schemas/export';
import { exportUnits, sendCsv } from '../http/csv';
import { parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validationError } from '../middleware/validate';
import { exportFlights, exportSessionFlights } from '../services/exports';

export const exportsRouter = Router();

exportsRouter.get('/clubs/:clubId/flights.csv', clubAccess(...ANY_ROLE), async (req, res) => {
  const query = flightsExportQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  const today = new Date().toISOString().slice(0, 10);
  sendCsv(res, await exportFlights(clubOf(req), query.data, await exportUnits(req, query.data.units), today));
});

exportsRouter.get('/clubs/:clubId/sessions/:sessionId/flights.csv', clubAccess(...ANY_ROLE), async (req, res) => {
  const query = exportUnitsQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  const sessionId = parseId(req.params.sessionId, 'session');
  sendCsv(res, await exportSessionFlights(clubOf(req), sessionId, await exportUnits(req, query.data.units)));
});
