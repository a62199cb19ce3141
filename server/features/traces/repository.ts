import type { EntityManager } from 'typeorm';
import { FitEntity, SweepEntity, type FitRow, type SweepRow } from '../../db/entities';

export async function findFitInLab(em: EntityManager, labId: number, id: number): Promise<FitRow | null> {
  return em.getRepository(FitEntity).findOneBy({ id, labId });
}

export async function findSweep(em: EntityManager, id: number): Promise<SweepRow | null> {
  return em.getRepository(SweepEntity).findOneBy({ id });
}

/** The stored bytes of a sweep's files, in upload order: the calibration feature's reader. */
export { sweepContents as sweepFileBytes } from '../calibration/repository';
