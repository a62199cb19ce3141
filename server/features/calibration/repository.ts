import { In, type EntityManager } from 'typeorm';
import {
  FitEntity, JobEntity, SweepEntity, SweepFileEntity, UserEntity,
  type FitRow, type JobRow, type SweepFileRow, type SweepRow, type UserRow,
} from '../../db/entities';

export async function findSweepInLab(em: EntityManager, labId: number, id: number): Promise<SweepRow | null> {
  return em.getRepository(SweepEntity).findOneBy({ id, labId });
}

export async function listSweepsOfDevice(em: EntityManager, deviceId: number): Promise<SweepRow[]> {
  return em.getRepository(SweepEntity).find({ where: { deviceId }, order: { createdAt: 'DESC', id: 'DESC' } });
}

/** File metadata of sweeps (no bytes), grouped by sweep in upload order. */
export async function fileInfoOf(em: EntityManager, sweepIds: number[]): Promise<Map<number, SweepFileRow[]>> {
  const out = new Map<number, SweepFileRow[]>();
  if (!sweepIds.length) return out;
  const rows = await em.getRepository(SweepFileEntity).find({ where: { sweepId: In(sweepIds) }, order: { sweepId: 'ASC', position: 'ASC' } });
  for (const r of rows) out.set(r.sweepId, [...(out.get(r.sweepId) ?? []), r]);
  return out;
}

/** The stored bytes of a sweep, in upload order. */
export async function sweepContents(em: EntityManager, sweepId: number): Promise<Array<{ name: string; content: Buffer }>> {
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

export async function findFitInLab(em: EntityManager, labId: number, id: number): Promise<FitRow | null> {
  return em.getRepository(FitEntity).findOneBy({ id, labId });
}

export async function listFitsOfDevice(em: EntityManager, deviceId: number): Promise<FitRow[]> {
  return em.getRepository(FitEntity).find({ where: { deviceId }, order: { version: 'DESC' } });
}

export async function acceptedFitOf(em: EntityManager, deviceId: number): Promise<FitRow | null> {
  return em.getRepository(FitEntity).findOne({ where: { deviceId, status: 'accepted' }, order: { version: 'DESC' } });
}

export interface ActiveFitRow {
  id: number;
  deviceId: number;
  version: number;
  kind: FitRow['kind'];
  model: FitRow['model'];
  status: FitRow['status'];
  reviewedById: number | null;
  reviewedAt: Date | null;
  f0Hz: number | null;
  f0Err: number | null;
  gamma0: number | null;
  gamma0Err: number | null;
  asymmetry: number | null;
  asymmetryErr: number | null;
}

const num = (v: unknown): number | null => {
  if (v === null || v === undefined) return null;
  const n = Number(v);
  return Number.isFinite(n) ? n : null;
};

/** Per device of the lab: its accepted fit (if any) and whether a proposed one waits for review. */
export async function calibrationStateOfLab(
  em: EntityManager,
  labId: number,
  deviceIds?: number[],
): Promise<Map<number, { accepted: ActiveFitRow | null; proposed: boolean }>> {
  // Standard errors read inside the database: the calibration JSON itself can be large.
  const qb = em
    .getRepository(FitEntity)
    .createQueryBuilder('f')
    .select(['f.id AS id', 'f.deviceId AS deviceId', 'f.version AS version', 'f.kind AS kind', 'f.model AS model', 'f.status AS status'])
    .addSelect(['f.reviewedById AS reviewedById', 'f.reviewedAt AS reviewedAt', 'f.f0Hz AS f0Hz', 'f.gamma0 AS gamma0', 'f.asymmetry AS asymmetry'])
    .addSelect("JSON_VALUE(f.calibration, '$.params.f0_hz.stderr')", 'f0Err')
    .addSelect("JSON_VALUE(f.calibration, '$.params.gamma0.stderr')", 'gamma0Err')
    .addSelect("JSON_VALUE(f.calibration, '$.params.asymmetry.stderr')", 'asymmetryErr')
    .where('f.labId = :labId', { labId })
    .andWhere("f.status IN ('accepted', 'proposed')");
  if (deviceIds) {
    if (!deviceIds.length) return new Map();
    qb.andWhere('f.deviceId IN (:...deviceIds)', { deviceIds });
  }
  const raw: Array<Record<string, unknown>> = await qb.getRawMany();
  const out = new Map<number, { accepted: ActiveFitRow | null; proposed: boolean }>();
  for (const x of raw) {
    const r: ActiveFitRow = {
      id: Number(x.id),
      deviceId: Number(x.deviceId),
      version: Number(x.version),
      kind: x.kind as FitRow['kind'],
      model: x.model as FitRow['model'],
      status: x.status as FitRow['status'],
      reviewedById: num(x.reviewedById),
      reviewedAt: x.reviewedAt ? new Date(x.reviewedAt as string) : null,
      f0Hz: num(x.f0Hz),
      f0Err: num(x.f0Err),
      gamma0: num(x.gamma0),
      gamma0Err: num(x.gamma0Err),
      asymmetry: num(x.asymmetry),
      asymmetryErr: num(x.asymmetryErr),
    };
    const s = out.get(r.deviceId) ?? { accepted: null, proposed: false };
    if (r.status === 'accepted' && (!s.accepted || r.version > s.accepted.version)) s.accepted = r;
    if (r.status === 'proposed') s.proposed = true;
    out.set(r.deviceId, s);
  }
  return out;
}

/**
 * Row lock on the device for the rest of the transaction. Every change to which fit is active (and
 * every new version number) takes this lock first, so concurrent reviews and fits serialise per device.
 */
export async function lockDevice(em: EntityManager, deviceId: number): Promise<boolean> {
  const rows: unknown[] = await em.query('SELECT `id` FROM `device` WHERE `id` = ? FOR UPDATE', [deviceId]);
  return rows.length === 1;
}

/** Next version number of a device's fits; call with the device locked. */
export async function nextFitVersion(em: EntityManager, deviceId: number): Promise<number> {
  const [row] = await em.query('SELECT COALESCE(MAX(`version`), 0) AS v FROM `fit` WHERE `deviceId` = ?', [deviceId]);
  return Number(row.v) + 1;
}

export async function findJobInLab(em: EntityManager, labId: number, id: number): Promise<JobRow | null> {
  return em.getRepository(JobEntity).findOneBy({ id, labId });
}

export async function usersById(em: EntityManager, ids: Array<number | null | undefined>): Promise<Map<number, UserRow>> {
  const want = [...new Set(ids.filter((x): x is number => typeof x === 'number'))];
  const rows = want.length ? await em.getRepository(UserEntity).findBy({ id: In(want) }) : [];
  return new Map(rows.map((u) => [u.id, u]));
}

/** Active members of a lab with one role (notification recipients). */
export async function activeUsersWithRole(em: EntityManager, labId: number, role: UserRow['role']): Promise<UserRow[]> {
  return em.getRepository(UserEntity).find({ where: { labId, role, active: true }, order: { id: 'ASC' } });
}
