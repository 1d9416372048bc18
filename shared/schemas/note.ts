/**
 * Coach notes on a flight or a session. A note is private to the staff or shared with the athlete
 * (on a session: with every athlete who has a flight in it).
 */
import { z } from 'zod';

export const NOTE_VISIBILITIES = ['staff', 'shared'] as const;
export type NoteVisibility = (typeof NOTE_VISIBILITIES)[number];

const body = z
  .string({ error: 'Write the note.' })
  .trim()
  .min(1, { error: 'Write the note; it is empty.' })
  .max(4000, { error: 'Keep the note to 4000 characters or fewer.' });
const visibility = z.enum(NOTE_VISIBILITIES, { error: 'Choose who sees the note: staff (coaches and admins) or shared (also the athlete).' });

export const noteInputSchema = z.object({ body, visibility: visibility.default('staff') }).strict();
export type NoteInput = z.infer<typeof noteInputSchema>;

export const notePatchSchema = z
  .object({ body: body.optional(), visibility: visibility.optional() })
  .strict()
  .refine((p) => Object.keys(p).length > 0, { error: 'Change the text or who sees the note.' });
export type NotePatch = z.infer<typeof notePatchSchema>;

export interface Note {
  id: number;
  flightId: number | null;
  sessionId: number | null;
  authorName: string;
  /** True when the caller wrote it (the client offers edit and delete then, or to an admin). */
  mine: boolean;
  body: string;
  visibility: NoteVisibility;
  createdAt: string;
  updatedAt: string;
}
