import { describe, expect, it } from 'vitest';
import { hashPassword, verifyPassword } from '../../server/auth/passwords';
import { PASSWORD_MIN_LENGTH, passwordProblem } from '../../shared/schemas/auth';

describe('passwords (scrypt)', () => {
  it('verifies the right password and refuses a wrong one', async () => {
    const hash = await hashPassword('Correct horse 9');
    // Tests run with PASSWORD_SCRYPT_LOG_N=12 (vitest.config.ts); production defaults to 2^17.
    expect(hash).toMatch(/^scrypt\$4096\$8\$1\$[A-Za-z0-9+/=]+\$[A-Za-z0-9+/=]+$/);
    expect(await verifyPassword('Correct horse 9', hash)).toBe(true);
    expect(await verifyPassword('Correct horse 8', hash)).toBe(false);
  });

  it('salts every hash, so one password gives different hashes', async () => {
    const [a, b] = await Promise.all([hashPassword('Same password 1'), hashPassword('Same password 1')]);
    expect(a).not.toBe(b);
    expect(await verifyPassword('Same password 1', b)).toBe(true);
  });

  it('treats composed and decomposed Unicode forms as one password', async () => {
    const hash = await hashPassword('Caf\u00e9 au lait 7');
    expect(await verifyPassword('Cafe\u0301 au lait 7', hash)).toBe(true);
  });

  it('answers false, not an error, when the stored hash is malformed', async () => {
    for (const stored of ['', 'plain', 'scrypt$x$8$1$aa$bb', 'bcrypt$1$2$3$4$5', 'scrypt$16384$8$1$$']) {
      expect(await verifyPassword('anything 12345', stored)).toBe(false);
    }
  });
});

describe('password policy', () => {
  it('accepts a long phrase with two kinds of character', () => {
    expect(passwordProblem('tall grass 42')).toBeNull();
    expect(passwordProblem('correct horse battery')).toBeNull();
  });

  it('says how long a password must be when it is too short', () => {
    expect(passwordProblem('Ab1!'.padEnd(PASSWORD_MIN_LENGTH - 1, 'x'))).toMatch(`at least ${PASSWORD_MIN_LENGTH} characters`);
  });

  it('asks for a second kind of character when all are one kind', () => {
    expect(passwordProblem('abcdefghijkl')).toMatch(/two kinds/);
    expect(passwordProblem('123456789012')).toMatch(/two kinds/);
  });

  it('refuses the e-mail address as password whatever its case', () => {
    expect(passwordProblem('Coach@Club.example', 'coach@club.example')).toMatch(/e-mail address/);
  });
});
