import { Router } from 'express';
import { clubBallInputSchema, clubBallPatchSchema } from '../../shared/schemas/ball';
import { parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { createClubBall, deleteClubBall, listClubBalls, patchClubBall } from '../services/balls';

/** The club's own balls: every member reads them; admins and coaches add, edit and delete unused ones. */
export const ballsRouter = Router();

ballsRouter.get('/clubs/:clubId/balls', clubAccess(...ANY_ROLE), async (req, res) => {
  const balls = await listClubBalls(clubOf(req));
  res.json({ data: balls, meta: { total: balls.length } });
});

ballsRouter.post('/clubs/:clubId/balls', clubAccess('admin', 'coach'), validate(clubBallInputSchema), async (req, res) => {
  res.status(201).json({ data: await createClubBall(clubOf(req), req.body) });
});

ballsRouter.patch('/clubs/:clubId/balls/:ballId', clubAccess('admin', 'coach'), validate(clubBallPatchSchema), async (req, res) => {
  res.json({ data: await patchClubBall(clubOf(req), parseId(req.params.ballId, 'ball'), req.body) });
});

ballsRouter.delete('/clubs/:clubId/balls/:ballId', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteClubBall(clubOf(req), parseId(req.params.ballId, 'ball'));
  res.status(204).end();
});
