import type { EntityManager } from 'typeorm';
import { FitEntity, SweepEntity, SweepFileEntity, type FitRow, type SweepRow } from '../../db/entities';

export async function findFitInLab(em: EntityManager, labId: number, id: number): Promise<FitRow | null> {
  return em.getRepository(FitEntity).findOneBy({ id, labId });
}

export async function findSweep(em: EntityManager, id: number): Promise<SweepRow | null> {
  return em.getRepository(SweepEntity).findOneBy({ id });
}

/** The stored bytes of a sweep's files, in upload order (content is not selected by default). */
export async function sweepFileBytes(em: EntityManager, sweepId: number): Promise<Array<{ name: string; content: Buffer }>> {
  const rows = await em
    .getRepository(SweepFileEntity)
    .createQueryBuilder('f')
    .select(['f.name', 'f.position'])
    .addSelect('f.content')
    .where('f.sweepId = :sweepId', { sweepId })
    .orderBy('f.position', 'ASC')
    .getMany();
  return rows.map((r) => ({ name: r.name, content: r.content }));
}
