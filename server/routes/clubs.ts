import { Router } from 'express';
import { clubUpdateSchema } from '../../shared/schemas/club';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { getClub, getOverview, updateClub } from '../services/clubs';

/** The club profile and its Overview. */
export const clubsRouter = Router();

clubsRouter.get('/clubs/:clubId/overview', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getOverview(clubOf(req)) });
});

clubsRouter.get('/clubs/:clubId', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getClub(clubOf(req).id) });
});

clubsRouter.patch('/clubs/:clubId', clubAccess('admin'), validate(clubUpdateSchema), async (req, res) => {
  res.json({ data: await updateClub(clubOf(req).id, req.body) });
});
