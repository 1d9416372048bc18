/**
 * Password hashing with scrypt (Percival 2009; RFC 7914), Node's built-in KDF, with a per-user random salt.
 * Stored format: `scrypt$<N>$<r>$<p>$<salt base64>$<hash base64>`, so every hash carries its own cost and a
 * hash of an older cost still verifies; `needsRehash` tells when to store a new one (at the next sign-in).
 */
import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto';
import { config } from '../config';

/**
 * Cost parameters: N = 2^PASSWORD_SCRYPT_LOG_N (default 2^17), r = 8, p = 1: the OWASP Password Storage
 * Cheat Sheet's scrypt setting, 128 MiB per guess. maxmem must exceed 128·N·r bytes.
 */
const R = 8;
const P = 1;
const KEY_LENGTH = 64;
const SALT_LENGTH = 16;
/** Bounds of the configurable cost: below 2^14 is too cheap anywhere but a test, above 2^20 needs 1 GiB a guess. */
const MIN_LOG_N = 10;
const MAX_LOG_N = 20;

/** The cost new hashes get. */
export function currentCost(): { N: number; r: number; p: number } {
  const logN = config.passwords.scryptLogN;
  if (logN < MIN_LOG_N || logN > MAX_LOG_N) {
    throw new Error(`PASSWORD_SCRYPT_LOG_N must be between ${MIN_LOG_N} and ${MAX_LOG_N} (got ${logN}); 17 is the recommended cost.`);
  }
  return { N: 2 ** logN, r: R, p: P };
}

function derive(password: string, salt: Buffer, keyLength: number, options: ScryptOptions): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    scrypt(password.normalize('NFKC'), salt, keyLength, options, (err, key) => (err ? reject(err) : resolve(key)));
  });
}

export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(SALT_LENGTH);
  const { N, r, p } = currentCost();
  const key = await derive(password, salt, KEY_LENGTH, { N, r, p, maxmem: 256 * N * r });
  return ['scrypt', N, r, p, salt.toString('base64'), key.toString('base64')].join('$');
}

function parse(stored: string): { N: number; r: number; p: number; salt: Buffer; expected: Buffer } | null {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return null;
  const [N, r, p] = parts.slice(1, 4).map(Number);
  if (![N, r, p].every((v) => Number.isInteger(v) && v! > 0)) return null;
  const salt = Buffer.from(parts[4]!, 'base64');
  const expected = Buffer.from(parts[5]!, 'base64');
  if (salt.length === 0 || expected.length === 0) return null;
  return { N: N!, r: r!, p: p!, salt, expected };
}

/** Constant-time comparison of a password with a stored hash; false for malformed hashes. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const hash = parse(stored);
  if (!hash) return false;
  const { N, r, p, salt, expected } = hash;
  const actual = await derive(password, salt, expected.length, { N, r, p, maxmem: 256 * N * r });
  return timingSafeEqual(actual, expected);
}

/** True when a stored hash was made with another cost (or key length) than new hashes get. */
export function needsRehash(stored: string): boolean {
  const hash = parse(stored);
  if (!hash) return true;
  const cost = currentCost();
  return hash.N !== cost.N || hash.r !== cost.r || hash.p !== cost.p || hash.expected.length !== KEY_LENGTH;
}

/** A hash of a random password, compared against when the e-mail is unknown so timing does not reveal accounts. */
let decoy: Promise<string> | undefined;
export function decoyHash(): Promise<string> {
  decoy ??= hashPassword(randomBytes(16).toString('hex'));
  return decoy;
}
