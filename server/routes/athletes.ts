import { Router } from 'express';
import { athleteCreateSchema, athleteUpdateSchema } from '../../shared/schemas/club';
import { parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { createAthlete, getAthlete, listAthletes, updateAthlete } from '../services/athletes';

/** Athlete profiles: coaches and admins manage all, an athlete reads only their own. */
export const athletesRouter = Router();

athletesRouter.get('/clubs/:clubId/athletes', clubAccess(...ANY_ROLE), async (req, res) => {
  const athletes = await listAthletes(clubOf(req));
  res.json({ data: athletes, meta: { total: athletes.length } });
});

athletesRouter.get('/clubs/:clubId/athletes/:athleteId', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getAthlete(clubOf(req), parseId(req.params.athleteId, 'athlete')) });
});

athletesRouter.post('/clubs/:clubId/athletes', clubAccess('admin', 'coach'), validate(athleteCreateSchema), async (req, res) => {
  res.status(201).json({ data: await createAthlete(clubOf(req), req.body) });
});

athletesRouter.patch('/clubs/:clubId/athletes/:athleteId', clubAccess('admin', 'coach'), validate(athleteUpdateSchema), async (req, res) => {
  res.json({ data: await updateAthlete(clubOf(req), parseId(req.params.athleteId, 'athlete'), req.body) });
});
