import { Router } from 'express';
import { clubAccess, clubOf } from '../middleware/authorize';
import { getMyFlights } from '../services/my-flights';

/** "My flights": an athlete's own landing page. Staff have their Overview instead (403 here). */
export const myFlightsRouter = Router();

myFlightsRouter.get('/clubs/:clubId/my-flights', clubAccess('athlete'), async (req, res) => {
  res.json({ data: await getMyFlights(clubOf(req), req.user!.id) });
});
