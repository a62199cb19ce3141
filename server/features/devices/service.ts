import type { DataSource, EntityManager } from 'typeorm';
import type { Cooldown, CreateCooldownRequest, CreateDeviceRequest, Device, DeviceListQuery } from '@/shared/api/devices';
import { CooldownEntity, DeviceEntity, type CooldownRow, type UserRow } from '../../db/entities';
import { AppError, isDuplicateKey } from '../../http/errors';
import { recordAudit } from '../audit/service';
import { findBatchInLab } from '../batches/repository';
import { toActiveSummary } from '../calibration/json';
import { calibrationStateOfLab, usersById, type ActiveFitRow } from '../calibration/repository';
import { findDevices, listCooldowns, type DeviceFilter, type DeviceWithBatch } from './repository';

type CalibrationState = Map<number, { accepted: ActiveFitRow | null; proposed: boolean }>;

/** Device JSON with its calibration status from the fits (state from calibrationStateOfLab). */
async function devicesJson(em: EntityManager, labId: number, rows: DeviceWithBatch[]): Promise<Device[]> {
  const state: CalibrationState = rows.length ? await calibrationStateOfLab(em, labId, rows.map((d) => d.id)) : new Map();
  const users = await usersById(em, [...state.values()].map((s) => s.accepted?.reviewedById));
  return rows.map((d) => toDeviceJson(d, state, users));
}

export function toDeviceJson(d: DeviceWithBatch, state: CalibrationState = new Map(), users: Map<number, UserRow> = new Map()): Device {
  const s = state.get(d.id);
  return {
    id: d.id,
    name: d.name,
    batchId: d.batchId,
    batchCode: d.batchCode,
    chipPosition: d.chipPosition,
    geometry: d.geometry,
    designZ0Ohm: d.designZ0Ohm,
    designFrequencyHz: d.designFrequencyHz,
    loopInductanceH: d.loopInductanceH,
    calibrationStatus: s?.accepted ? 'accepted' : s?.proposed ? 'proposed' : 'none',
    activeCalibration: s?.accepted ? toActiveSummary(s.accepted, users) : null,
  };
}

export function toCooldownJson(c: CooldownRow): Cooldown {
  return {
    id: c.id,
    deviceId: c.deviceId,
    startedOn: c.startedOn,
    fridge: c.fridge,
    notes: c.notes,
    createdAt: c.createdAt.toISOString(),
  };
}

export async function listDevices(ds: DataSource, labId: number, q: DeviceListQuery): Promise<Device[]> {
  const f: DeviceFilter = { search: q.search || undefined };
  if (q.batch) {
    if (/^\d+$/.test(q.batch)) f.batchId = Number(q.batch);
    else f.batchCode = q.batch;
  }
  return devicesJson(ds.manager, labId, await findDevices(ds.manager, labId, f));
}

export async function getDevice(ds: DataSource, labId: number, id: number): Promise<{ device: Device; cooldowns: Cooldown[] }> {
  const [d] = await findDevices(ds.manager, labId, { id });
  if (!d) throw AppError.notFound(`no device ${id} in your lab`);
  const [device] = await devicesJson(ds.manager, labId, [d]);
  return { device, cooldowns: (await listCooldowns(ds.manager, d.id)).map(toCooldownJson) };
}

const duplicate = (name: string) =>
  AppError.conflict(`device name ${name} is already used in your lab`, [{ path: 'name', message: 'already used in your lab' }]);

export async function createDevice(ds: DataSource, actor: UserRow, req: CreateDeviceRequest): Promise<Device> {
  const batch = await findBatchInLab(ds.manager, actor.labId, req.batchId);
  if (!batch) {
    throw AppError.validation([{ path: 'batchId', message: `no batch ${req.batchId} in your lab` }]);
  }
  if (await ds.getRepository(DeviceEntity).findOneBy({ labId: actor.labId, name: req.name })) throw duplicate(req.name);
  try {
    const id = await ds.transaction(async (em) => {
      const { identifiers } = await em.getRepository(DeviceEntity).insert({
        labId: actor.labId,
        batchId: batch.id,
        name: req.name,
        chipPosition: req.chipPosition || null,
        geometry: req.geometry,
        designZ0Ohm: req.designZ0Ohm ?? null,
        designFrequencyHz: req.designFrequencyHz ?? null,
        loopInductanceH: req.loopInductanceH ?? null,
        createdById: actor.id,
      });
      const newId = identifiers[0].id as number;
      await recordAudit(em, {
        labId: actor.labId,
        actorId: actor.id,
        action: 'device.create',
        subjectType: 'device',
        subjectId: newId,
        details: { name: req.name, batch: batch.code, geometry: req.geometry },
      });
      return newId;
    });
    const [d] = await findDevices(ds.manager, actor.labId, { id });
    return toDeviceJson(d);
  } catch (e) {
    if (isDuplicateKey(e)) throw duplicate(req.name);
    throw e;
  }
}

export async function addCooldown(ds: DataSource, actor: UserRow, deviceId: number, req: CreateCooldownRequest): Promise<Cooldown> {
  const [d] = await findDevices(ds.manager, actor.labId, { id: deviceId });
  if (!d) throw AppError.notFound(`no device ${deviceId} in your lab`);
  return ds.transaction(async (em) => {
    const repo = em.getRepository(CooldownEntity);
    const { identifiers } = await repo.insert({
      deviceId: d.id,
      startedOn: req.startedOn,
      fridge: req.fridge,
      notes: req.notes || null,
      createdById: actor.id,
    });
    const row = await repo.findOneByOrFail({ id: identifiers[0].id as number });
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'cooldown.create',
      subjectType: 'cooldown',
      subjectId: row.id,
      details: { device: d.name, fridge: row.fridge, startedOn: row.startedOn },
    });
    return toCooldownJson(row);
  });
}
