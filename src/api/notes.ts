import type { DataResponse } from '@shared/types/api';
import type { Note, NoteInput, NotePatch } from '@shared/schemas/note';
import { http, type RequestOptions } from './http';

export type { Note, NoteInput, NotePatch };

/** What a note belongs to. */
export interface NoteTarget {
  kind: 'flight' | 'session';
  id: number;
}

const targetPath = (clubId: number, t: NoteTarget) => `/clubs/${clubId}/${t.kind === 'flight' ? 'flights' : 'sessions'}/${t.id}/notes`;

export async function listNotes(clubId: number, target: NoteTarget, options?: RequestOptions): Promise<Note[]> {
  return (await http.get<DataResponse<Note[]>>(targetPath(clubId, target), options)).data;
}

export async function addNote(clubId: number, target: NoteTarget, body: NoteInput, options?: RequestOptions): Promise<Note> {
  return (await http.post<DataResponse<Note>>(targetPath(clubId, target), body, options)).data;
}

export async function updateNote(clubId: number, noteId: number, patch: NotePatch, options?: RequestOptions): Promise<Note> {
  return (await http.patch<DataResponse<Note>>(`/clubs/${clubId}/notes/${noteId}`, patch, options)).data;
}

export async function deleteNote(clubId: number, noteId: number, options?: RequestOptions): Promise<void> {
  await http.delete(`/clubs/${clubId}/notes/${noteId}`, options);
}
