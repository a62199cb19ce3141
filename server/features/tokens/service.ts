import type { DataSource } from 'typeorm';
import { In, IsNull } from 'typeorm';
import type { ApiToken, ApiTokenCreatedResponse, CreateApiTokenRequest } from '@/shared/api/tokens';
import { API_TOKEN_PREFIX } from '@/shared/api/tokens';
import { randomSecret, sha256Hex } from '../../auth/secrets';
import { ApiTokenEntity, UserEntity, type ApiTokenRow, type UserRow } from '../../db/entities';
import { AppError } from '../../http/errors';
import { recordAudit } from '../audit/service';

export function toApiTokenJson(t: ApiTokenRow): ApiToken {
  return {
    id: t.id,
    name: t.name,
    scopes: Array.isArray(t.scopes) ? t.scopes : [],
    createdAt: t.createdAt.toISOString(),
    lastUsedAt: t.lastUsedAt ? t.lastUsedAt.toISOString() : null,
    revokedAt: t.revokedAt ? t.revokedAt.toISOString() : null,
  };
}

export async function listOwnTokens(ds: DataSource, userId: number): Promise<ApiToken[]> {
  const rows = await ds.getRepository(ApiTokenEntity).find({ where: { userId }, order: { createdAt: 'DESC', id: 'DESC' } });
  return rows.map(toApiTokenJson);
}

export async function createToken(ds: DataSource, owner: UserRow, req: CreateApiTokenRequest): Promise<ApiTokenCreatedResponse> {
  const secret = API_TOKEN_PREFIX + randomSecret();
  return ds.transaction(async (em) => {
    const repo = em.getRepository(ApiTokenEntity);
    const { identifiers } = await repo.insert({
      userId: owner.id,
      name: req.name,
      tokenHash: sha256Hex(secret),
      scopes: [...new Set(req.scopes ?? [])],
    });
    const row = await repo.findOneByOrFail({ id: identifiers[0].id as number });
    await recordAudit(em, {
      labId: owner.labId,
      actorId: owner.id,
      action: 'token.create',
      subjectType: 'api_token',
      subjectId: row.id,
      details: { name: row.name, scopes: row.scopes },
    });
    return { token: secret, apiToken: toApiTokenJson(row) };
  });
}

/** Owner may revoke their own; a lab lead may revoke any token of a user in their lab. Others see 404. */
export async function revokeToken(ds: DataSource, actor: UserRow, id: number): Promise<void> {
  await ds.transaction(async (em) => {
    const repo = em.getRepository(ApiTokenEntity);
    const t = await repo.findOne({ where: { id }, lock: { mode: 'pessimistic_write' } });
    let allowed = !!t && t.userId === actor.id;
    if (t && !allowed && actor.role === 'lab_lead') {
      allowed = !!(await em.getRepository(UserEntity).findOneBy({ id: In([t.userId]), labId: actor.labId }));
    }
    if (!t || !allowed) throw AppError.notFound(`no API token ${id} that you may revoke`);
    if (t.revokedAt) return; // revoking twice is a no-op (DELETE is idempotent, RFC 9110 §9.2.2)
    await repo.update({ id: t.id, revokedAt: IsNull() }, { revokedAt: new Date() });
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'token.revoke',
      subjectType: 'api_token',
      subjectId: t.id,
      details: { ownerId: t.userId, name: t.name },
    });
  });
}
