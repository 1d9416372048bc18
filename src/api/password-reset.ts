import type { DataResponse } from '@shared/types/api';
import type { PasswordResetBody, PasswordResetRequestBody } from '@shared/schemas/password-reset';
import { http } from './http';

const BASE = '/auth/password-reset';

/** Asks for a reset link; the answer is the same whether or not the address has an account. */
export async function requestPasswordReset(body: PasswordResetRequestBody): Promise<string> {
  return (await http.post<DataResponse<{ message: string }>>(BASE, body, { notify: false, expectUnauthenticated: true })).data.message;
}

/** Whether a reset link still works (fails with the reason when it does not). */
export async function checkPasswordReset(token: string): Promise<{ email: string; expiresAt: string }> {
  return (await http.get<DataResponse<{ email: string; expiresAt: string }>>(`${BASE}/${encodeURIComponent(token)}`, { expectUnauthenticated: true })).data;
}

export async function resetPassword(token: string, body: PasswordResetBody): Promise<string> {
  return (await http.post<DataResponse<{ message: string }>>(`${BASE}/${encodeURIComponent(token)}`, body, { notify: false, expectUnauthenticated: true })).data.message;
}
