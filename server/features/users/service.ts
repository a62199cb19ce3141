import type { DataSource } from 'typeorm';
import type { User } from '@/shared/api/auth';
import type { UpdateUserRequest } from '@/shared/api/users';
import { UserEntity, type UserRow } from '../../db/entities';
import { AppError } from '../../http/errors';
import { recordAudit } from '../audit/service';
import { labName, listUsersInLab, toUserJson } from './repository';

export async function listUsers(ds: DataSource, labId: number): Promise<User[]> {
  const name = await labName(ds.manager, labId);
  return (await listUsersInLab(ds.manager, labId)).map((u) => toUserJson(u, name));
}

export async function updateUser(ds: DataSource, actor: UserRow, id: number, req: UpdateUserRequest): Promise<User> {
  return ds.transaction(async (em) => {
    const repo = em.getRepository(UserEntity);
    const u = await repo.findOne({ where: { id, labId: actor.labId }, lock: { mode: 'pessimistic_write' } });
    if (!u) throw AppError.notFound(`no user ${id} in your lab`);
    // A lead demoting or deactivating themselves could leave the lab with nobody to manage it.
    if (u.id === actor.id && ((req.role && req.role !== u.role) || req.active === false)) {
      throw AppError.conflict('you cannot change your own role or deactivate yourself; ask another lab lead');
    }
    const changes: Partial<Pick<UserRow, 'role' | 'active'>> = {};
    if (req.role !== undefined && req.role !== u.role) changes.role = req.role;
    if (req.active !== undefined && req.active !== !!u.active) changes.active = req.active;
    if (Object.keys(changes).length) {
      await repo.update({ id: u.id }, changes);
      await recordAudit(em, {
        labId: actor.labId,
        actorId: actor.id,
        action: 'user.update',
        subjectType: 'user',
        subjectId: u.id,
        details: { before: { role: u.role, active: !!u.active }, after: changes },
      });
    }
    const fresh = await repo.findOneByOrFail({ id: u.id });
    return toUserJson(fresh, await labName(em, fresh.labId));
  });
}
