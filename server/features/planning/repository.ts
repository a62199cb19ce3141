// Plans, notes and pump lines: the queries the planning service needs (no HTTP, no core calls).
import { In, type EntityManager } from 'typeorm';
import type { CalibrationJson } from '@/calibration/contract';
import { FitEntity, PlanEntity, PlanNoteEntity, PumpLineEntity, type PlanNoteRow, type PlanRow, type PumpLineRow } from '../../db/entities';

export interface FitRef {
  id: number;
  version: number;
}

/** The accepted fit of each device (id and version only; the JSON is read separately and cached). */
export async function acceptedFitRefs(em: EntityManager, deviceIds: number[]): Promise<Map<number, FitRef>> {
  const out = new Map<number, FitRef>();
  if (!deviceIds.length) return out;
  const rows = (await em.query(
    "SELECT `id`, `deviceId`, `version` FROM `fit` WHERE `status` = 'accepted' AND `deviceId` IN (?) ORDER BY `version` ASC",
    [deviceIds],
  )) as Array<{ id: number; deviceId: number; version: number }>;
  // A device has at most one accepted fit (reviews serialise on the device lock); the highest version wins regardless.
  for (const r of rows) out.set(Number(r.deviceId), { id: Number(r.id), version: Number(r.version) });
  return out;
}

export async function fitVersions(em: EntityManager, fitIds: number[]): Promise<Map<number, number>> {
  const want = [...new Set(fitIds)];
  if (!want.length) return new Map();
  const rows = await em.getRepository(FitEntity).find({ select: { id: true, version: true }, where: { id: In(want) } });
  return new Map(rows.map((f) => [f.id, f.version]));
}

// Fits never change after insert (the fit_immutable trigger), so a calibration read once can be kept:
// per data source (ids are per database), least recently used dropped first.
const CAL_CACHE_SIZE = 64;
const calCaches = new WeakMap<object, Map<number, CalibrationJson>>();

export async function calibrationOfFit(em: EntityManager, fitId: number): Promise<CalibrationJson> {
  let calCache = calCaches.get(em.connection);
  if (!calCache) calCaches.set(em.connection, (calCache = new Map()));
  const hit = calCache.get(fitId);
  if (hit) {
    calCache.delete(fitId);
    calCache.set(fitId, hit);
    return hit;
  }
  const row = await em.getRepository(FitEntity).findOneOrFail({ select: { id: true, calibration: true }, where: { id: fitId } });
  calCache.set(fitId, row.calibration);
  while (calCache.size > CAL_CACHE_SIZE) calCache.delete(calCache.keys().next().value as number);
  return row.calibration;
}

export async function pumpLineOf(em: EntityManager, deviceId: number): Promise<PumpLineRow | null> {
  return em.getRepository(PumpLineEntity).findOneBy({ deviceId });
}

export async function findPlanInLab(em: EntityManager, labId: number, id: number): Promise<PlanRow | null> {
  return em.getRepository(PlanEntity).findOneBy({ id, labId });
}

export async function listPlansOfLab(em: EntityManager, labId: number, deviceId?: number): Promise<PlanRow[]> {
  return em.getRepository(PlanEntity).find({
    where: deviceId === undefined ? { labId } : { labId, deviceId },
    order: { createdAt: 'DESC', id: 'DESC' },
    take: 500,
  });
}

/** For each plan id: the newest plan that re-planned it. */
export async function replannedBy(em: EntityManager, planIds: number[]): Promise<Map<number, number>> {
  const out = new Map<number, number>();
  if (!planIds.length) return out;
  const rows = (await em.query('SELECT `id`, `replannedFromId` FROM `plan` WHERE `replannedFromId` IN (?) ORDER BY `id` ASC', [planIds])) as Array<{
    id: number;
    replannedFromId: number;
  }>;
  for (const r of rows) out.set(Number(r.replannedFromId), Number(r.id));
  return out;
}

export async function notesOf(em: EntityManager, planIds: number[]): Promise<Map<number, PlanNoteRow[]>> {
  const out = new Map<number, PlanNoteRow[]>();
  if (!planIds.length) return out;
  const rows = await em.getRepository(PlanNoteEntity).find({ where: { planId: In(planIds) }, order: { createdAt: 'ASC', id: 'ASC' } });
  for (const n of rows) out.set(n.planId, [...(out.get(n.planId) ?? []), n]);
  return out;
}

export async function noteCounts(em: EntityManager, planIds: number[]): Promise<Map<number, number>> {
  const out = new Map<number, number>();
  if (!planIds.length) return out;
  const rows = (await em.query('SELECT `planId`, COUNT(*) AS n FROM `plan_note` WHERE `planId` IN (?) GROUP BY `planId`', [planIds])) as Array<{ planId: number; n: number }>;
  for (const r of rows) out.set(Number(r.planId), Number(r.n));
  return out;
}

/** Active experimentalists of the lab who authored a plan on the device (calibration e-mails). */
export async function experimentalistsWithPlansOn(em: EntityManager, labId: number, deviceId: number): Promise<Array<{ id: number; email: string; name: string }>> {
  const rows = (await em.query(
    "SELECT DISTINCT u.`id`, u.`email`, u.`name` FROM `plan` p JOIN `user` u ON u.`id` = p.`authorId` WHERE p.`labId` = ? AND p.`deviceId` = ? AND u.`labId` = ? AND u.`role` = 'experimentalist' AND u.`active` = 1 ORDER BY u.`id` ASC",
    [labId, deviceId, labId],
  )) as Array<{ id: number; email: string; name: string }>;
  return rows.map((r) => ({ id: Number(r.id), email: String(r.email), name: String(r.name) }));
}
