/**
 * Invitations to join a club: the request bodies (shared by the invite dialog, the join page and the
 * server's `validate()`) and the response shapes.
 */
import { z } from 'zod';
import type { Me, Role } from '../types/api';
import { displayNameSchema, PASSWORD_MAX_LENGTH, passwordProblem } from './auth';
import { roleSchema } from './club';

/** What is stored; "expired" is a pending invitation past its expiry. */
export const INVITATION_STATUSES = ['pending', 'accepted', 'revoked'] as const;
export type InvitationStatus = (typeof INVITATION_STATUSES)[number];
export const INVITATION_STATES = ['pending', 'accepted', 'expired', 'revoked'] as const;
export type InvitationState = (typeof INVITATION_STATES)[number];

/** The address an invitation goes to; the words say what to fix. */
export const inviteEmailSchema = z
  .string({ error: 'Enter the e-mail address to send the invitation to.' })
  .trim()
  .toLowerCase()
  .min(1, { error: 'Enter the e-mail address to send the invitation to.' })
  .max(254, { error: 'An e-mail address has at most 254 characters.' })
  .pipe(z.email({ error: 'That is not an e-mail address: write it like name@club.example.' }));

export const invitationCreateSchema = z
  .object({
    email: inviteEmailSchema,
    role: roleSchema,
    athleteProfileId: z
      .number({ error: 'Pick the athlete profile to tie the invitation to, or leave it empty.' })
      .int({ error: 'Pick the athlete profile to tie the invitation to, or leave it empty.' })
      .positive({ error: 'Pick the athlete profile to tie the invitation to, or leave it empty.' })
      .nullable()
      .optional(),
  })
  .strict()
  .superRefine((body, ctx) => {
    if (body.athleteProfileId != null && body.role !== 'athlete') {
      ctx.addIssue({ code: 'custom', path: ['athleteProfileId'], message: 'Only an athlete invitation can be tied to an athlete profile: pick the athlete role or clear the profile.' });
    }
  });
export type InvitationCreateBody = z.infer<typeof invitationCreateSchema>;

/** Accepting: a new account sends its name and password; someone already signed in sends nothing. */
export const invitationAcceptSchema = z
  .object({
    displayName: displayNameSchema.optional(),
    password: z
      .string({ error: 'Choose a password.' })
      .max(PASSWORD_MAX_LENGTH, { error: `Use at most ${PASSWORD_MAX_LENGTH} characters.` })
      .optional(),
  })
  .strict();
export type InvitationAcceptBody = z.infer<typeof invitationAcceptSchema>;

/** The join page's form for someone without an account: name and password are both needed; `email` gives the invited address. */
export function invitationNewAccountSchema(email: () => string) {
  return z
    .object({ displayName: displayNameSchema, password: z.string({ error: 'Choose a password.' }) })
    .strict()
    .superRefine((body, ctx) => {
      const problem = passwordProblem(body.password, email());
      if (problem) ctx.addIssue({ code: 'custom', path: ['password'], message: problem });
    });
}

/** One row of the admin's invitation list. */
export interface InvitationSummary {
  id: number;
  email: string;
  role: Role;
  state: InvitationState;
  athleteProfileId: number | null;
  athleteName: string | null;
  invitedByName: string | null;
  createdAt: string;
  sentAt: string;
  expiresAt: string;
  acceptedAt: string | null;
  revokedAt: string | null;
}

/** What the join page shows for a valid link. */
export interface InvitationPreview {
  clubName: string;
  role: Role;
  email: string;
  invitedByName: string | null;
  athleteName: string | null;
  expiresAt: string;
  /** Whether an account with the invited address exists (then the invitee signs in instead of signing up). */
  hasAccount: boolean;
  /** Whether the caller is signed in with the invited address. */
  signedInAsInvitee: boolean;
}

/** The answer to accepting: the club joined, and the signed-in user afterwards. */
export interface InvitationAccepted {
  clubId: number;
  clubName: string;
  role: Role;
  me: Me;
}
