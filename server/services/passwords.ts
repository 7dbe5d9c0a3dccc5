/** Password hashing (bcrypt) and single-use tokens (random, stored as SHA-256). */
import { createHash, randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';

export function hashPassword(password: string, cost: number): Promise<string> {
  return bcrypt.hash(password, cost);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

/** SHA-256 of a string, hex. Tokens and rig keys are high-entropy, so an unsalted hash suffices. */
export function sha256Hex(value: string): string {
  return createHash('sha256').update(value, 'utf8').digest('hex');
}

/** A fresh token: 32 random bytes, base64url (43 characters), and the hash we store. */
export function newToken(prefix = ''): { token: string; hash: string } {
  const token = prefix + randomBytes(32).toString('base64url');
  return { token, hash: sha256Hex(token) };
}
