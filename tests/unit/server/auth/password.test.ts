import { describe, expect, it } from 'vitest';
import { hashPassword, verifyPassword } from '../../../../server/auth/password';

/*
 * The stored form is `scrypt$N$r$p$salt$key` (base64 salt and key). The check against the outside world is the
 * scrypt test vector of RFC 7914 §12 [confirmed]: scrypt(P = "password", S = "NaCl", N = 1024, r = 8, p = 16,
 * dkLen = 64) = fdbabe1c…cc0640. scrypt's last step is PBKDF2-HMAC-SHA-256, whose first 32-byte block does not
 * depend on dkLen [derived] (RFC 8018 §5.2), so the vector's first 32 bytes are the 32-byte key Cristae stores.
 */
const RFC7914_64 =
  'fdbabe1c9d3472007856e7190d01e9fe7c6ad7cbc8237830e77376634b3731622eaf30d92e22a3886ff109279d9830dac727afb94a83ee6d8360cbdfa2cc0640';
const key32 = Buffer.from(RFC7914_64.slice(0, 64), 'hex').toString('base64');
const salt = Buffer.from('NaCl', 'utf8').toString('base64');
const stored = ['scrypt', 1024, 8, 16, salt, key32].join('$');

describe('verifyPassword against RFC 7914 §12', () => {
  it('accepts the vector\'s password and refuses any other', async () => {
    // [confirmed] RFC 7914 §12, second test vector.
    expect(await verifyPassword('password', stored)).toBe(true);
    expect(await verifyPassword('Password', stored)).toBe(false);
    expect(await verifyPassword('password ', stored)).toBe(false);
  });
  it('uses the stored N, r and p: the same key under other parameters is refused', async () => {
    // [derived] RFC 7914 §2: the key depends on N, r and p.
    expect(await verifyPassword('password', ['scrypt', 2048, 8, 16, salt, key32].join('$'))).toBe(false);
    expect(await verifyPassword('password', ['scrypt', 1024, 4, 16, salt, key32].join('$'))).toBe(false);
    expect(await verifyPassword('password', ['scrypt', 1024, 8, 8, salt, key32].join('$'))).toBe(false);
  });
  it('refuses a stored value of another scheme, with a part missing, or with a key of another length', async () => {
    // [common practice] a malformed or foreign hash never verifies (OWASP Password Storage Cheat Sheet).
    expect(await verifyPassword('password', stored.replace(/^scrypt/, 'bcrypt'))).toBe(false);
    for (let drop = 1; drop < 6; drop += 1) {
      const parts = stored.split('$');
      parts[drop] = '';
      expect(await verifyPassword('password', parts.join('$'))).toBe(false);
    }
    const longKey = Buffer.from(RFC7914_64, 'hex').toString('base64');
    expect(await verifyPassword('password', ['scrypt', 1024, 8, 16, salt, longKey].join('$'))).toBe(false);
  });
});

describe('hashPassword', () => {
  it('stores scrypt with N = 2^14, r = 8, p = 1, a 16-byte salt and a 32-byte key, salted afresh each time', async () => {
    // [confirmed] RFC 7914 §2 parameter meaning; N = 2^14, r = 8, p = 1 [common practice] (OWASP Password
    // Storage Cheat Sheet lists N = 2^17 as its current minimum with r = 8, p = 1; Cristae's choice is documented
    // in server/auth/password.ts).
    const a = await hashPassword('correct horse');
    const b = await hashPassword('correct horse');
    const [scheme, n, r, p, s, k] = a.split('$');
    expect([scheme, n, r, p]).toEqual(['scrypt', '16384', '8', '1']);
    expect(Buffer.from(s!, 'base64')).toHaveLength(16);
    expect(Buffer.from(k!, 'base64')).toHaveLength(32);
    expect(a).not.toBe(b);
    expect(await verifyPassword('correct horse', a)).toBe(true);
    expect(await verifyPassword('correct horsf', a)).toBe(false);
  });
});
