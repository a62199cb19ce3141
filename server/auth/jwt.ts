import { createSecretKey, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';
import type { Role } from '@/shared/api/common';

export interface AccessClaims {
  sub: string;
  role: Role;
  lab: number;
  iat: number;
  exp: number;
}

/**
 * jsonwebtoken turns a string secret into a key on every call, first trying it as a public key
 * (an exception each time); a KeyObject made once per secret skips that work on every request.
 */
const keys = new Map<string, KeyObject>();
function hmacKey(secret: string): KeyObject {
  let k = keys.get(secret);
  if (!k) keys.set(secret, (k = createSecretKey(Buffer.from(secret, 'utf8'))));
  return k;
}

export function signAccessToken(
  user: { id: number; role: Role; labId: number },
  secret: string,
  expiresInSeconds: number,
): { token: string; expiresAt: Date } {
  const now = Math.floor(Date.now() / 1000);
  const exp = now + expiresInSeconds;
  const token = jwt.sign({ sub: String(user.id), role: user.role, lab: user.labId, iat: now, exp }, hmacKey(secret), {
    algorithm: 'HS256',
  });
  return { token, expiresAt: new Date(exp * 1000) };
}

/** Throws a message fit for a 401 answer. Only HS256 is accepted (no "none", no algorithm switch). */
export function verifyAccessToken(token: string, secret: string): AccessClaims {
  try {
    const claims = jwt.verify(token, hmacKey(secret), { algorithms: ['HS256'] });
    if (typeof claims !== 'object' || typeof claims.sub !== 'string' || typeof claims.exp !== 'number') {
      throw new Error('token lacks sub or exp');
    }
    return claims as AccessClaims;
  } catch (e) {
    if (e instanceof jwt.TokenExpiredError) throw new Error('token expired; sign in again');
    throw new Error('invalid token');
  }
}
