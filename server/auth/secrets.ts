import { createHash, randomBytes } from 'node:crypto';

/** 32 random bytes, URL-safe: the secret part of invitation, reset and API-token links. */
export function randomSecret(): string {
  return randomBytes(32).toString('base64url');
}

/** Only SHA-256 hashes of secrets are stored; a leaked table row does not grant access. */
export function sha256Hex(secret: string): string {
  return createHash('sha256').update(secret, 'utf8').digest('hex');
}
