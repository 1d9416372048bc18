import type { z } from 'zod';
import type { signInSchema, signUpSchema } from '@shared/schemas/auth';
import type { DataResponse, Me } from '@shared/types/api';
import { ApiRequestError } from './errors';
import { apiUrl, http, resetCsrfToken, type RequestOptions } from './http';

export type SignInBody = z.input<typeof signInSchema>;
export type SignUpBody = z.input<typeof signUpSchema>;

/** Where the "Continue with Google" button sends the browser (a full page load, not fetch). */
export const GOOGLE_SIGN_IN_URL = apiUrl('/auth/google');

/** The signed-in user, or null when nobody is signed in. */
export async function fetchMe(options?: RequestOptions): Promise<Me | null> {
  try {
    return (await http.get<DataResponse<Me>>('/auth/me', { ...options, expectUnauthenticated: true })).data;
  } catch (error) {
    if (error instanceof ApiRequestError && error.code === 'UNAUTHENTICATED') return null;
    throw error;
  }
}

// Sign-in, sign-up and sign-out renew the server session, which voids the CSRF token: drop it afterwards.

export async function signIn(body: SignInBody): Promise<Me> {
  const me = (await http.post<DataResponse<Me>>('/auth/signin', body, { notify: false, expectUnauthenticated: true })).data;
  resetCsrfToken();
  return me;
}

export async function signUp(body: SignUpBody): Promise<Me> {
  const me = (await http.post<DataResponse<Me>>('/auth/signup', body, { notify: false })).data;
  resetCsrfToken();
  return me;
}

export async function signOut(): Promise<void> {
  try {
    await http.post<void>('/auth/signout', undefined, { expectUnauthenticated: true });
  } finally {
    resetCsrfToken();
  }
}
