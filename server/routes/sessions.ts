import { Router } from 'express';
import { sessionInputSchema, sessionListQuerySchema, sessionPatchSchema } from '../../shared/schemas/session';
import { confirmed } from '../http/confirm';
import { parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate, validationError } from '../middleware/validate';
import { createSession, deleteSession, getSession, listSessions, updateSession } from '../services/sessions';
import { assertClubCanRecord } from '../services/subscriptions';

/** Sessions: admins and coaches manage them; an athlete reads only sessions holding their own flights. */
export const sessionsRouter = Router();

sessionsRouter.get('/clubs/:clubId/sessions', clubAccess(...ANY_ROLE), async (req, res) => {
  const query = sessionListQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  res.json(await listSessions(clubOf(req), query.data));
});

sessionsRouter.post('/clubs/:clubId/sessions', clubAccess('admin', 'coach'), validate(sessionInputSchema), async (req, res) => {
  await assertClubCanRecord(clubOf(req).id);
  res.status(201).json({ data: await createSession(clubOf(req), req.body) });
});

sessionsRouter.get('/clubs/:clubId/sessions/:sessionId', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await getSession(clubOf(req), parseId(req.params.sessionId, 'session')) });
});

sessionsRouter.patch('/clubs/:clubId/sessions/:sessionId', clubAccess('admin', 'coach'), validate(sessionPatchSchema), async (req, res) => {
  res.json({ data: await updateSession(clubOf(req), parseId(req.params.sessionId, 'session'), req.body) });
});

sessionsRouter.delete('/clubs/:clubId/sessions/:sessionId', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteSession(clubOf(req), parseId(req.params.sessionId, 'session'), confirmed(req));
  res.status(204).end();
});
