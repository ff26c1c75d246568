// Unguessable tokens for e-mailed links and share links: 160 random bits, stored only as a SHA-256 hash.
import { randomBytes, createHash } from 'node:crypto';

/** Returns a new URL-safe token (32 base32 characters = 160 bits). */
export function newToken(): string {
  const bytes = randomBytes(20);
  const alphabet = 'abcdefghijklmnopqrstuvwxyz234567';
  let bits = 0;
  let value = 0;
  let out = '';
  for (const byte of bytes) {
    value = (value << 8) | byte;
    bits += 8;
    while (bits >= 5) {
      out += alphabet[(value >>> (bits - 5)) & 31];
      bits -= 5;
    }
  }
  return out;
}

/** Returns the hex SHA-256 of a token (what the database keeps). */
export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

/** Returns a new user id (lower-case, 20 characters). */
export function newUserId(): string {
  return newToken().slice(0, 20);
}
