import type { DataSource } from 'typeorm';
import type { CreateBatchRequest, FabBatch } from '@/shared/api/batches';
import { FabBatchEntity, type FabBatchRow, type UserRow } from '../../db/entities';
import { AppError, isDuplicateKey } from '../../http/errors';
import { recordAudit } from '../audit/service';
import { findBatchByCode, listBatchesWithCounts } from './repository';

export function toBatchJson(b: FabBatchRow, deviceCount: number): FabBatch {
  return {
    id: b.id,
    code: b.code,
    wafer: b.wafer,
    processNotes: b.processNotes,
    fabricatedOn: b.fabricatedOn,
    deviceCount,
  };
}

export async function listBatches(ds: DataSource, labId: number): Promise<FabBatch[]> {
  return (await listBatchesWithCounts(ds.manager, labId)).map((b) => toBatchJson(b, b.deviceCount));
}

const duplicate = (code: string) =>
  AppError.conflict(`batch code ${code} is already used in your lab`, [{ path: 'code', message: 'already used in your lab' }]);

export async function createBatch(ds: DataSource, actor: UserRow, req: CreateBatchRequest): Promise<FabBatch> {
  if (await findBatchByCode(ds.manager, actor.labId, req.code)) throw duplicate(req.code);
  try {
    return await ds.transaction(async (em) => {
      const repo = em.getRepository(FabBatchEntity);
      const { identifiers } = await repo.insert({
        labId: actor.labId,
        code: req.code,
        wafer: req.wafer || null,
        processNotes: req.processNotes || null,
        fabricatedOn: req.fabricatedOn ?? null,
        createdById: actor.id,
      });
      const row = await repo.findOneByOrFail({ id: identifiers[0].id as number });
      await recordAudit(em, {
        labId: actor.labId,
        actorId: actor.id,
        action: 'batch.create',
        subjectType: 'fab_batch',
        subjectId: row.id,
        details: { code: row.code },
      });
      return toBatchJson(row, 0);
    });
  } catch (e) {
    if (isDuplicateKey(e)) throw duplicate(req.code);
    throw e;
  }
}
