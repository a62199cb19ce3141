import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { DataSource } from 'typeorm';
import { IsNull } from 'typeorm';
import type { User } from '@/shared/api/auth';
import type { Role } from '@/shared/api/common';
import { API_TOKEN_PREFIX } from '@/shared/api/tokens';
import { ApiTokenEntity, type UserRow } from '../db/entities';
import { findUserById, labName, toUserJson } from '../features/users/repository';
import { AppError } from '../http/errors';
import { verifyAccessToken } from './jwt';
import { sha256Hex } from './secrets';

/** Who is calling: always re-read from the database, so role changes and deactivation act at once. */
export interface Principal {
  user: User;
  row: UserRow;
  via: 'jwt' | 'api_token';
  apiTokenId?: number;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      principal?: Principal;
    }
  }
}

export function principal(req: Request): Principal {
  if (!req.principal) throw AppError.unauthenticated();
  return req.principal;
}

function bearer(req: Request): string {
  const h = req.headers.authorization;
  if (!h) throw AppError.unauthenticated('missing Authorization header: send "Bearer <token>"');
  const m = /^Bearer\s+(\S+)\s*$/i.exec(h);
  if (!m) throw AppError.unauthenticated('Authorization header must be "Bearer <token>"');
  return m[1];
}

/** Resolve the bearer token (JWT or fwt_ API token) to an active user, or throw 401. */
export async function authenticate(dataSource: DataSource, jwtSecret: string, req: Request): Promise<Principal> {
  const em = dataSource.manager;
  const token = bearer(req);
  let row: UserRow | null;
  let apiTokenId: number | undefined;
  if (token.startsWith(API_TOKEN_PREFIX)) {
    const repo = em.getRepository(ApiTokenEntity);
    const t = await repo.findOneBy({ tokenHash: sha256Hex(token) });
    if (!t) throw AppError.unauthenticated('unknown API token');
    if (t.revokedAt) throw AppError.unauthenticated('API token was revoked');
    // Conditional update keeps a revoke that raced this request from being undone.
    await repo.update({ id: t.id, revokedAt: IsNull() }, { lastUsedAt: new Date() });
    row = await findUserById(em, t.userId);
    apiTokenId = t.id;
  } else {
    let claims;
    try {
      claims = verifyAccessToken(token, jwtSecret);
    } catch (e) {
      throw AppError.unauthenticated((e as Error).message);
    }
    const id = Number(claims.sub);
    row = Number.isInteger(id) ? await findUserById(em, id) : null;
  }
  if (!row) throw AppError.unauthenticated('the account for this token no longer exists');
  if (!row.active) throw AppError.unauthenticated('this account is deactivated; ask your lab lead');
  return {
    row,
    user: toUserJson(row, await labName(em, row.labId)),
    via: apiTokenId ? 'api_token' : 'jwt',
    apiTokenId,
  };
}

/** 403 unless the principal holds one of the roles. */
export function checkRole(p: Principal, roles: readonly Role[]): void {
  if (!roles.includes(p.user.role)) {
    throw AppError.forbidden(`this needs one of the roles ${roles.join(', ')}; you are ${p.user.role}`);
  }
}

/** requireAuth + requireRole in one handler: 401 (no/invalid token) is decided before 403 (wrong role). */
export function guardFactory(dataSource: DataSource, jwtSecret: string) {
  return (...roles: Role[]): RequestHandler =>
    async (req: Request, _res: Response, next: NextFunction) => {
      req.principal = await authenticate(dataSource, jwtSecret, req);
      checkRole(req.principal, roles);
      next();
    };
}

export function requireAuth(dataSource: DataSource, jwtSecret: string): RequestHandler {
  return async (req, _res, next) => {
    req.principal = await authenticate(dataSource, jwtSecret, req);
    next();
  };
}

export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    checkRole(principal(req), roles);
    next();
  };
}
