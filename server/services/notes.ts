/**
 * Coach notes on flights and sessions. Staff read every note of the club; an athlete reads only the
 * shared notes on their own flights and on the sessions that hold one of them. A note is edited or
 * deleted by its author or a club admin.
 */
import { Op } from 'sequelize';
import type { Note as NoteDto, NoteInput, NotePatch } from '../../shared/schemas/note';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { CoachNote, Flight, User } from '../models';
import { athleteSessionIds, findVisibleFlight, findVisibleSession } from './visibility';

/** Who asks: the club context and the signed-in user. */
export interface NoteCaller {
  club: ClubContext;
  userId: number;
}

function toNoteDto(note: CoachNote, userId: number): NoteDto {
  return {
    id: note.id,
    flightId: note.flightId ?? null,
    sessionId: note.sessionId ?? null,
    authorName: note.author?.displayName ?? 'Former member',
    mine: note.authorUserId === userId,
    body: note.body,
    visibility: note.visibility,
    createdAt: note.createdAt.toISOString(),
    updatedAt: note.updatedAt.toISOString(),
  };
}

const withAuthor = [{ model: User, as: 'author', attributes: ['id', 'displayName'] }];

/** The visibility filter of the caller: athletes see shared notes only. */
function visibleTo(club: ClubContext): { visibility?: 'shared' } {
  return club.role === 'athlete' ? { visibility: 'shared' } : {};
}

export async function listFlightNotes({ club, userId }: NoteCaller, flightId: number): Promise<NoteDto[]> {
  const flight = await findVisibleFlight(club, flightId);
  const notes = await CoachNote.findAll({ where: { clubId: club.id, flightId: flight.id, ...visibleTo(club) }, include: withAuthor, order: [['id', 'ASC']] });
  return notes.map((n) => toNoteDto(n, userId));
}

export async function listSessionNotes({ club, userId }: NoteCaller, sessionId: number): Promise<NoteDto[]> {
  const session = await findVisibleSession(club, sessionId);
  const notes = await CoachNote.findAll({ where: { clubId: club.id, sessionId: session.id, ...visibleTo(club) }, include: withAuthor, order: [['id', 'ASC']] });
  return notes.map((n) => toNoteDto(n, userId));
}

export async function createFlightNote({ club, userId }: NoteCaller, flightId: number, input: NoteInput): Promise<NoteDto> {
  const flight = await findVisibleFlight(club, flightId);
  const note = await CoachNote.create({ clubId: club.id, flightId: flight.id, sessionId: null, authorUserId: userId, body: input.body, visibility: input.visibility });
  return toNoteDto((await CoachNote.findByPk(note.id, { include: withAuthor }))!, userId);
}

export async function createSessionNote({ club, userId }: NoteCaller, sessionId: number, input: NoteInput): Promise<NoteDto> {
  const session = await findVisibleSession(club, sessionId);
  const note = await CoachNote.create({ clubId: club.id, flightId: null, sessionId: session.id, authorUserId: userId, body: input.body, visibility: input.visibility });
  return toNoteDto((await CoachNote.findByPk(note.id, { include: withAuthor }))!, userId);
}

/** The note for a change by its author or an admin; another coach gets 403, another club's note 404. */
async function findEditableNote({ club, userId }: NoteCaller, noteId: number): Promise<CoachNote> {
  const note = await CoachNote.findOne({ where: { id: noteId, clubId: club.id }, include: withAuthor });
  if (!note) throw notFound('note');
  if (note.authorUserId !== userId && club.role !== 'admin') {
    throw new ApiError('FORBIDDEN', `Only the note’s author (${note.author?.displayName ?? 'a former member'}) or a club admin can change or delete it. Add a note of your own instead.`);
  }
  return note;
}

export async function patchNote(caller: NoteCaller, noteId: number, patch: NotePatch): Promise<NoteDto> {
  const note = await findEditableNote(caller, noteId);
  if (patch.body !== undefined) note.body = patch.body;
  if (patch.visibility !== undefined) note.visibility = patch.visibility;
  await note.save();
  return toNoteDto(note, caller.userId);
}

export async function deleteNote(caller: NoteCaller, noteId: number): Promise<void> {
  const note = await findEditableNote(caller, noteId);
  await note.destroy();
}

/** The notes shared with an athlete: on their own flights and on the sessions that hold one (newest first). */
export async function sharedNotesForAthlete(club: ClubContext, userId: number, limit = 20): Promise<NoteDto[]> {
  if (club.athleteProfileId === null) return [];
  const [sessionIds, flights] = await Promise.all([
    athleteSessionIds(club),
    Flight.findAll({ where: { clubId: club.id, athleteProfileId: club.athleteProfileId }, attributes: ['id'] }),
  ]);
  const or: Record<string, unknown>[] = [];
  if (flights.length > 0) or.push({ flightId: { [Op.in]: flights.map((f) => f.id) } });
  if (sessionIds.length > 0) or.push({ sessionId: { [Op.in]: sessionIds } });
  if (or.length === 0) return [];
  const notes = await CoachNote.findAll({
    where: { clubId: club.id, visibility: 'shared', [Op.or]: or },
    include: withAuthor,
    order: [['createdAt', 'DESC'], ['id', 'DESC']],
    limit,
  });
  return notes.map((n) => toNoteDto(n, userId));
}
