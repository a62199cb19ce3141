import type { EntityManager } from 'typeorm';
import type { User } from '@/shared/api/auth';
import { LabEntity, UserEntity, type UserRow } from '../../db/entities';

export async function findUserById(em: EntityManager, id: number): Promise<UserRow | null> {
  return em.getRepository(UserEntity).findOneBy({ id });
}

export async function findUserByEmail(em: EntityManager, email: string): Promise<UserRow | null> {
  return em.getRepository(UserEntity).findOneBy({ email: email.toLowerCase() });
}

export async function listUsersInLab(em: EntityManager, labId: number): Promise<UserRow[]> {
  return em.getRepository(UserEntity).find({ where: { labId }, order: { name: 'ASC', id: 'ASC' } });
}

export async function labName(em: EntityManager, labId: number): Promise<string> {
  const lab = await em.getRepository(LabEntity).findOneBy({ id: labId });
  return lab?.name ?? '';
}

export function toUserJson(u: UserRow, labName: string): User {
  return { id: u.id, email: u.email, name: u.name, role: u.role, active: !!u.active, labId: u.labId, labName };
}
