import type { EntityManager } from 'typeorm';
import { DeviceEntity, FabBatchEntity, type FabBatchRow } from '../../db/entities';

export async function listBatchesWithCounts(em: EntityManager, labId: number): Promise<Array<FabBatchRow & { deviceCount: number }>> {
  const batches = await em.getRepository(FabBatchEntity).find({ where: { labId }, order: { code: 'ASC' } });
  const counts: Array<{ batchId: number; n: string | number }> = await em
    .getRepository(DeviceEntity)
    .createQueryBuilder('d')
    .select('d.batchId', 'batchId')
    .addSelect('COUNT(*)', 'n')
    .where('d.labId = :labId', { labId })
    .groupBy('d.batchId')
    .getRawMany();
  const byBatch = new Map(counts.map((c) => [Number(c.batchId), Number(c.n)]));
  return batches.map((b) => ({ ...b, deviceCount: byBatch.get(b.id) ?? 0 }));
}

export async function findBatchInLab(em: EntityManager, labId: number, id: number): Promise<FabBatchRow | null> {
  return em.getRepository(FabBatchEntity).findOneBy({ id, labId });
}

export async function findBatchByCode(em: EntityManager, labId: number, code: string): Promise<FabBatchRow | null> {
  return em.getRepository(FabBatchEntity).findOneBy({ code, labId });
}
