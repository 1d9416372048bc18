/**
 * Tokens of e-mailed links (invitations, password reset): 32 random bytes written base64url (43
 * characters). Only their SHA-256 is stored, so a copy of the database opens no link.
 */
import { createHash, randomBytes } from 'node:crypto';

const TOKEN_SHAPE = /^[A-Za-z0-9_-]{43}$/;

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

/** True when the text could be a token at all (a cut-off or altered link is not). */
export function isTokenShaped(token: string): boolean {
  return TOKEN_SHAPE.test(token);
}
