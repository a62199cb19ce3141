import type { EntityManager } from 'typeorm';
import { CooldownEntity, DeviceEntity, type CooldownRow, type DeviceRow } from '../../db/entities';

export interface DeviceWithBatch extends DeviceRow {
  batchCode: string;
}

export interface DeviceFilter {
  search?: string;
  batchId?: number;
  batchCode?: string;
}

function escapeLike(s: string): string {
  return s.replace(/[\\%_]/g, (c) => '\\' + c);
}

export async function findDevices(em: EntityManager, labId: number, f: DeviceFilter & { id?: number }): Promise<DeviceWithBatch[]> {
  const qb = em
    .getRepository(DeviceEntity)
    .createQueryBuilder('d')
    .innerJoin('FabBatch', 'b', 'b.id = d.batchId')
    .addSelect('b.code', 'batchCode')
    .where('d.labId = :labId', { labId });
  if (f.id !== undefined) qb.andWhere('d.id = :id', { id: f.id });
  if (f.batchId !== undefined) qb.andWhere('d.batchId = :batchId', { batchId: f.batchId });
  if (f.batchCode !== undefined) qb.andWhere('b.code = :batchCode', { batchCode: f.batchCode });
  if (f.search) {
    const like = `%${escapeLike(f.search)}%`;
    qb.andWhere('(d.name LIKE :like OR d.chipPosition LIKE :like OR b.code LIKE :like)', { like });
  }
  qb.orderBy('d.name', 'ASC').addOrderBy('d.id', 'ASC');
  const { entities, raw } = await qb.getRawAndEntities();
  // Rows and entities come back in the same order (one device per row: the join is many-to-one).
  return entities.map((d, i) => ({ ...d, batchCode: String((raw[i] as { batchCode: string }).batchCode) }));
}

export async function listCooldowns(em: EntityManager, deviceId: number): Promise<CooldownRow[]> {
  return em.getRepository(CooldownEntity).find({ where: { deviceId }, order: { startedOn: 'DESC', id: 'DESC' } });
}
