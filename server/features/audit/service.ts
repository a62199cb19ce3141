import type { EntityManager } from 'typeorm';
import type { AuditEvent } from '@/shared/api/audit';
import { AuditEventEntity, UserEntity } from '../../db/entities';
import { In } from 'typeorm';

export interface AuditInput {
  labId: number | null;
  actorId: number | null;
  action: string;
  subjectType?: string;
  subjectId?: string | number;
  details?: Record<string, unknown>;
}

/** Write inside the caller's transaction so the trail and the change commit together. */
export async function recordAudit(em: EntityManager, e: AuditInput): Promise<void> {
  await em.getRepository(AuditEventEntity).save({
    labId: e.labId,
    actorId: e.actorId,
    action: e.action,
    subjectType: e.subjectType ?? null,
    subjectId: e.subjectId === undefined ? null : String(e.subjectId),
    details: e.details ?? null,
  });
}

export async function listAudit(em: EntityManager, labId: number, limit = 200): Promise<AuditEvent[]> {
  const rows = await em.getRepository(AuditEventEntity).find({
    where: { labId },
    order: { createdAt: 'DESC', id: 'DESC' },
    take: limit,
  });
  const actorIds = [...new Set(rows.map((r) => r.actorId).filter((x): x is number => x !== null))];
  const actors = actorIds.length ? await em.getRepository(UserEntity).findBy({ id: In(actorIds) }) : [];
  const byId = new Map(actors.map((a) => [a.id, a]));
  return rows.map((r) => {
    const a = r.actorId !== null ? byId.get(r.actorId) : undefined;
    return {
      id: r.id,
      actor: a ? { id: a.id, name: a.name, email: a.email } : null,
      action: r.action,
      subject: r.subjectType ? { type: r.subjectType, id: r.subjectId } : null,
      createdAt: r.createdAt.toISOString(),
      details: r.details,
    };
  });
}
