import type { z } from 'zod';
import type { DataResponse } from '@shared/types/api';
import type { invitationCreateSchema, InvitationAcceptBody, InvitationAccepted, InvitationPreview, InvitationSummary } from '@shared/schemas/invitation';
import { http, resetCsrfToken, type RequestOptions } from './http';

export type { InvitationAcceptBody, InvitationAccepted, InvitationPreview, InvitationSummary };
export type InvitationCreateBody = z.input<typeof invitationCreateSchema>;

const invitations = (clubId: number) => `/clubs/${clubId}/invitations`;

export async function fetchInvitations(clubId: number, options?: RequestOptions): Promise<InvitationSummary[]> {
  return (await http.get<DataResponse<InvitationSummary[]>>(invitations(clubId), options)).data;
}

export async function createInvitation(clubId: number, body: InvitationCreateBody, options?: RequestOptions): Promise<InvitationSummary> {
  return (await http.post<DataResponse<InvitationSummary>>(invitations(clubId), body, options)).data;
}

export async function resendInvitation(clubId: number, invitationId: number, options?: RequestOptions): Promise<InvitationSummary> {
  return (await http.post<DataResponse<InvitationSummary>>(`${invitations(clubId)}/${invitationId}/resend`, undefined, options)).data;
}

export async function revokeInvitation(clubId: number, invitationId: number, options?: RequestOptions): Promise<InvitationSummary> {
  return (await http.post<DataResponse<InvitationSummary>>(`${invitations(clubId)}/${invitationId}/revoke`, undefined, options)).data;
}

/** What an invitation link offers; fails with the reason (expired, revoked, used, not valid). */
export async function fetchInvitationPreview(token: string, options?: RequestOptions): Promise<InvitationPreview> {
  return (await http.get<DataResponse<InvitationPreview>>(`/invitations/${encodeURIComponent(token)}`, { ...options, expectUnauthenticated: true })).data;
}

/** Accepts the invitation; a new account is signed in, which renews the session and so the CSRF token. */
export async function acceptInvitation(token: string, body: InvitationAcceptBody): Promise<InvitationAccepted> {
  const accepted = (await http.post<DataResponse<InvitationAccepted>>(`/invitations/${encodeURIComponent(token)}/accept`, body, { notify: false })).data;
  resetCsrfToken();
  return accepted;
}
