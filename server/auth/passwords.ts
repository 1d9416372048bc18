/**
 * Password hashing with scrypt (Percival 2009; RFC 7914), Node's built-in KDF, with a per-user random salt.
 * Stored format: `scrypt$<N>$<r>$<p>$<salt base64>$<hash base64>` so the cost can rise later without
 * breaking existing hashes.
 */
import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto';

/**
 * Cost parameters: N = 2^15, r = 8, p = 1 (OWASP Password Storage Cheat Sheet's scrypt minimum is
 * N = 2^17 with r = 8, p = 1 or an equivalent; 2^15 keeps sign-in fast on small servers while
 * needing 32 MiB per guess). maxmem must exceed 128·N·r bytes.
 */
const DEFAULTS = { N: 2 ** 15, r: 8, p: 1, keyLength: 64, saltLength: 16 } as const;

function derive(password: string, salt: Buffer, keyLength: number, options: ScryptOptions): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    scrypt(password.normalize('NFKC'), salt, keyLength, options, (err, key) => (err ? reject(err) : resolve(key)));
  });
}

export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(DEFAULTS.saltLength);
  const { N, r, p, keyLength } = DEFAULTS;
  const key = await derive(password, salt, keyLength, { N, r, p, maxmem: 256 * N * r });
  return ['scrypt', N, r, p, salt.toString('base64'), key.toString('base64')].join('$');
}

/** Constant-time comparison of a password with a stored hash; false for malformed hashes. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [N, r, p] = parts.slice(1, 4).map(Number);
  if (![N, r, p].every((v) => Number.isInteger(v) && v > 0)) return false;
  const salt = Buffer.from(parts[4], 'base64');
  const expected = Buffer.from(parts[5], 'base64');
  if (salt.length === 0 || expected.length === 0) return false;
  const actual = await derive(password, salt, expected.length, { N, r, p, maxmem: 256 * N * r });
  return timingSafeEqual(actual, expected);
}

/** A hash of a random password, compared against when the e-mail is unknown so timing does not reveal accounts. */
let decoy: Promise<string> | undefined;
export function decoyHash(): Promise<string> {
  decoy ??= hashPassword(randomBytes(16).toString('hex'));
  return decoy;
}
