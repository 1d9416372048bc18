import { Router, type Request } from 'express';
import { noteInputSchema, notePatchSchema } from '../../shared/schemas/note';
import { parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { createFlightNote, createSessionNote, deleteNote, listFlightNotes, listSessionNotes, patchNote, type NoteCaller } from '../services/notes';

/**
 * Coach notes on flights and sessions. Coaches and admins write; an athlete reads the shared notes of
 * their own flights and sessions (anything else 404). Only the author or an admin edits or deletes a note.
 */
export const notesRouter = Router();

const caller = (req: Request): NoteCaller => ({ club: clubOf(req), userId: req.user!.id });

notesRouter.get('/clubs/:clubId/flights/:flightId/notes', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await listFlightNotes(caller(req), parseId(req.params.flightId, 'flight')) });
});

notesRouter.post('/clubs/:clubId/flights/:flightId/notes', clubAccess('admin', 'coach'), validate(noteInputSchema), async (req, res) => {
  res.status(201).json({ data: await createFlightNote(caller(req), parseId(req.params.flightId, 'flight'), req.body) });
});

notesRouter.get('/clubs/:clubId/sessions/:sessionId/notes', clubAccess(...ANY_ROLE), async (req, res) => {
  res.json({ data: await listSessionNotes(caller(req), parseId(req.params.sessionId, 'session')) });
});

notesRouter.post('/clubs/:clubId/sessions/:sessionId/notes', clubAccess('admin', 'coach'), validate(noteInputSchema), async (req, res) => {
  res.status(201).json({ data: await createSessionNote(caller(req), parseId(req.params.sessionId, 'session'), req.body) });
});

notesRouter.patch('/clubs/:clubId/notes/:noteId', clubAccess('admin', 'coach'), validate(notePatchSchema), async (req, res) => {
  res.json({ data: await patchNote(caller(req), parseId(req.params.noteId, 'note'), req.body) });
});

notesRouter.delete('/clubs/:clubId/notes/:noteId', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteNote(caller(req), parseId(req.params.noteId, 'note'));
  res.status(204).end();
});
