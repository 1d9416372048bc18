import express, { Router } from 'express';
import {
  fitRequestSchema,
  flightActionInputSchema,
  flightActionPatchSchema,
  flightInputSchema,
  flightListQuerySchema,
  flightPatchSchema,
} from '../../shared/schemas/flight';
import { exportUnitsQuerySchema } from '../../shared/schemas/export';
import { followBodySchema, trackImportBodySchema, trackPointsBodySchema } from '../../shared/schemas/track';
import { exportUnits, sendCsv } from '../http/csv';
import { parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate, validationError } from '../middleware/validate';
import { getCameraMotion } from '../services/camera-motion';
import { listFits, requestFit } from '../services/fits';
import {
  createAction,
  createFlight,
  deleteAction,
  deleteFlight,
  getFlightDetail,
  listActions,
  listClipFlights,
  listFlightsPage,
  patchAction,
  patchFlight,
} from '../services/flights';
import { exportCsv, getPoints, importCsv, replacePoints, startFollow } from '../services/tracks';

/**
 * Flights, their points, auto-follow, CSV, fits, and the club's action list.
 * Admins and coaches write; an athlete reads only their own flights.
 */
export const flightsRouter = Router();

flightsRouter.get('/clubs/:clubId/flight-actions', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await listActions(clubOf(req)) });
});

flightsRouter.post('/clubs/:clubId/flight-actions', clubAccess('admin', 'coach'), validate(flightActionInputSchema), async (req, res) => {
  res.status(201).json({ data: await createAction(clubOf(req), req.body) });
});

flightsRouter.patch('/clubs/:clubId/flight-actions/:actionId', clubAccess('admin', 'coach'), validate(flightActionPatchSchema), async (req, res) => {
  res.json({ data: await patchAction(clubOf(req), parseId(req.params.actionId, 'action'), req.body) });
});

flightsRouter.delete('/clubs/:clubId/flight-actions/:actionId', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteAction(clubOf(req), parseId(req.params.actionId, 'action'));
  res.status(204).end();
});

flightsRouter.get('/clubs/:clubId/flights', clubAccess(...ANY_ROLE), async (req, res) => {
  const query = flightListQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  res.json(await listFlightsPage(clubOf(req), query.data));
});

flightsRouter.get('/clubs/:clubId/clips/:clipId/flights', clubAccess(...ANY_ROLE), async (req, res) => {
  const flights = await listClipFlights(clubOf(req), parseId(req.params.clipId, 'clip'));
  res.json({ data: flights, meta: { total: flights.length } });
});

flightsRouter.post('/clubs/:clubId/clips/:clipId/flights', clubAccess('admin', 'coach'), validate(flightInputSchema), async (req, res) => {
  res.status(201).json({ data: await createFlight(clubOf(req), parseId(req.params.clipId, 'clip'), req.body) });
});

flightsRouter.get('/clubs/:clubId/flights/:flightId', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getFlightDetail(clubOf(req), parseId(req.params.flightId, 'flight')) });
});

flightsRouter.patch('/clubs/:clubId/flights/:flightId', clubAccess('admin', 'coach'), validate(flightPatchSchema), async (req, res) => {
  res.json({ data: await patchFlight(clubOf(req), parseId(req.params.flightId, 'flight'), req.body) });
});

flightsRouter.delete('/clubs/:clubId/flights/:flightId', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteFlight(clubOf(req), parseId(req.params.flightId, 'flight'));
  res.status(204).end();
});

flightsRouter.get('/clubs/:clubId/flights/:flightId/points', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getPoints(clubOf(req), parseId(req.params.flightId, 'flight')) });
});

flightsRouter.put('/clubs/:clubId/flights/:flightId/points', clubAccess('admin', 'coach'), validate(trackPointsBodySchema), async (req, res) => {
  res.json({ data: await replacePoints(clubOf(req), parseId(req.params.flightId, 'flight'), req.body.points) });
});

flightsRouter.get('/clubs/:clubId/flights/:flightId/camera-motion', clubAccess('admin', 'coach'), async (req, res) => {
  res.json({ data: await getCameraMotion(clubOf(req), parseId(req.params.flightId, 'flight')) });
});

flightsRouter.post('/clubs/:clubId/flights/:flightId/follow', clubAccess('admin', 'coach'), validate(followBodySchema), async (req, res) => {
  res.status(202).json({ data: await startFollow(clubOf(req), parseId(req.params.flightId, 'flight'), req.body) });
});

// A raw `text/csv` body is read here (up to 5 MB); JSON `{ csv }` comes through the API's JSON parser.
flightsRouter.post(
  '/clubs/:clubId/flights/:flightId/track/import',
  clubAccess('admin', 'coach'),
  express.text({ type: ['text/csv', 'text/plain'], limit: '5mb' }),
  async (req, res) => {
    const body = typeof req.body === 'string' ? { csv: req.body } : req.body;
    const parsed = trackImportBodySchema.safeParse(body ?? {});
    if (!parsed.success) throw validationError(parsed.error);
    res.json({ data: await importCsv(clubOf(req), parseId(req.params.flightId, 'flight'), parsed.data.csv) });
  },
);

flightsRouter.get('/clubs/:clubId/flights/:flightId/track.csv', clubAccess(...ANY_ROLE), async (req, res) => {
  const query = exportUnitsQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  const flightId = parseId(req.params.flightId, 'flight');
  sendCsv(res, await exportCsv(clubOf(req), flightId, await exportUnits(req, query.data.units)));
});

flightsRouter.post('/clubs/:clubId/flights/:flightId/fit', clubAccess('admin', 'coach'), validate(fitRequestSchema), async (req, res) => {
  res.status(202).json({ data: await requestFit(clubOf(req), parseId(req.params.flightId, 'flight'), req.body.model) });
});

flightsRouter.get('/clubs/:clubId/flights/:flightId/fits', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await listFits(clubOf(req), parseId(req.params.flightId, 'flight')) });
});
