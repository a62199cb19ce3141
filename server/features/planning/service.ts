import type { DataSource, EntityManager } from 'typeorm';
import { CORE_VERSION } from '@/calibration/version';
import type { PlanRequest, PlanResult } from '@/calibration/planner/types';
import type {
  NoteRequest, OperatingPointsQuery, Plan, PlanNote, PlanSummary, PreviewRequest, PreviewResponse, PumpLine, PumpLineRecord,
  OperatingPointsResponse, SavePlanRequest, ReplanRequest,
} from '@/shared/api/planning';
import { PlanEntity, PlanNoteEntity, PumpLineEntity, type PlanNoteRow, type PlanRow, type PumpLineRow, type UserRow } from '../../db/entities';
import { AppError } from '../../http/errors';
import { recordAudit } from '../audit/service';
import { usersById } from '../calibration/repository';
import { findDevices, type DeviceWithBatch } from '../devices/repository';
import { fillFromPumpLine, pumpLineJson, runPlan, runRank } from './compute';
import {
  acceptedFitRefs, calibrationOfFit, findPlanInLab, fitVersions, listPlansOfLab, noteCounts, notesOf, pumpLineOf, replannedBy, type FitRef,
} from './repository';

async function deviceInLab(em: EntityManager, labId: number, id: number): Promise<DeviceWithBatch> {
  const [d] = await findDevices(em, labId, { id });
  if (!d) throw AppError.notFound(`no device ${id} in your lab`);
  return d;
}

async function activeFitOf(em: EntityManager, device: DeviceWithBatch): Promise<FitRef> {
  const fit = (await acceptedFitRefs(em, [device.id])).get(device.id);
  if (!fit) throw new AppError(404, 'NO_ACTIVE_CALIBRATION', `device ${device.name} has no accepted calibration yet`);
  return fit;
}

const iso = (d: Date) => new Date(d).toISOString();
const nameOf = (users: Map<number, UserRow>, id: number | null) => (id !== null ? users.get(id)?.name : undefined) ?? '(removed user)';

// ---------------------------------------------------------------------------------------------
// Computing

interface Computed {
  device: DeviceWithBatch;
  fit: FitRef;
  request: PlanRequest;
  result: PlanResult;
  filled: string[];
  pumpLine: PumpLine | null;
}

async function compute(em: EntityManager, labId: number, deviceId: number, req: PlanRequest, usePumpLine = true): Promise<Computed> {
  const device = await deviceInLab(em, labId, deviceId);
  const fit = await activeFitOf(em, device);
  const [cal, pl] = await Promise.all([calibrationOfFit(em, fit.id), usePumpLine ? pumpLineOf(em, device.id) : null]);
  const f = fillFromPumpLine(cal, req, pl);
  return { device, fit, request: f.request, result: runPlan(cal, f.request), filled: f.filled, pumpLine: f.pumpLine };
}

/** POST /api/plans/preview: compute, write nothing. */
export async function previewPlan(ds: DataSource, actor: UserRow, body: PreviewRequest): Promise<PreviewResponse> {
  const c = await compute(ds.manager, actor.labId, body.deviceId, body.request);
  const out: PreviewResponse = { result: c.result, fit: c.fit, filledFromPumpLine: c.filled };
  if (body.rank) {
    const cal = await calibrationOfFit(ds.manager, c.fit.id);
    out.ranking = runRank(cal, c.request, 5);
  }
  return out;
}

/** GET /api/devices/:id/operating-points */
export async function operatingPoints(ds: DataSource, actor: UserRow, deviceId: number, q: OperatingPointsQuery): Promise<OperatingPointsResponse> {
  if ((q.target === undefined) === (q.targetGainDb === undefined)) {
    throw AppError.validation([{ path: 'query.target', message: 'give exactly one of target (pairs/s) and targetGainDb (dB)' }]);
  }
  const em = ds.manager;
  const device = await deviceInLab(em, actor.labId, deviceId);
  const fit = await activeFitOf(em, device);
  const [cal, pl] = await Promise.all([calibrationOfFit(em, fit.id), pumpLineOf(em, device.id)]);
  const req: PlanRequest = { mode: q.mode, targetPairRate: q.target, targetGainDb: q.targetGainDb, pumpFrequencyHz: q.pumpFrequencyHz };
  for (const k of Object.keys(req) as Array<keyof PlanRequest>) if (req[k] === undefined) delete req[k];
  // The scan has no single operating point, so a measured threshold power (valid at one bias) is not
  // transferred here; a dc period is.
  const f = fillFromPumpLine(cal, req, pl);
  return { ranking: runRank(cal, f.request, q.top), fit, filledFromPumpLine: f.filled };
}

// ---------------------------------------------------------------------------------------------
// Plan JSON

function noteJson(n: PlanNoteRow, users: Map<number, UserRow>): PlanNote {
  return { id: n.id, authorId: n.authorId, authorName: nameOf(users, n.authorId), text: n.text, createdAt: iso(n.createdAt) };
}

interface Context {
  devices: Map<number, DeviceWithBatch>;
  active: Map<number, FitRef>;
  versions: Map<number, number>;
  users: Map<number, UserRow>;
  replannedBy: Map<number, number>;
}

async function context(em: EntityManager, labId: number, rows: PlanRow[], extraUsers: Array<number | null> = []): Promise<Context> {
  const deviceIds = [...new Set(rows.map((p) => p.deviceId))];
  const [deviceList, active, versions, users, replanned] = await Promise.all([
    deviceIds.length === 1 ? findDevices(em, labId, { id: deviceIds[0] }) : findDevices(em, labId, {}),
    acceptedFitRefs(em, deviceIds),
    fitVersions(em, rows.map((p) => p.fitId)),
    usersById(em, [...rows.map((p) => p.authorId), ...extraUsers]),
    replannedBy(em, rows.map((p) => p.id)),
  ]);
  return { devices: new Map(deviceList.map((d) => [d.id, d])), active, versions, users, replannedBy: replanned };
}

function common(p: PlanRow, c: Context) {
  const d = c.devices.get(p.deviceId);
  const a = c.active.get(p.deviceId) ?? null;
  return {
    id: p.id,
    deviceId: p.deviceId,
    deviceName: d?.name ?? '',
    fitId: p.fitId,
    fitVersion: c.versions.get(p.fitId) ?? 0,
    activeFitId: a?.id ?? null,
    activeFitVersion: a?.version ?? null,
    stale: p.fitId !== a?.id,
    authorId: p.authorId,
    authorName: nameOf(c.users, p.authorId),
    mode: p.mode,
    createdAt: iso(p.createdAt),
    replannedFromId: p.replannedFromId,
    replannedById: c.replannedBy.get(p.id) ?? null,
  };
}

function planJson(p: PlanRow, c: Context, notes: PlanNoteRow[]): Plan {
  const base = common(p, c);
  return {
    ...base,
    batchCode: c.devices.get(p.deviceId)?.batchCode ?? '',
    request: p.request,
    result: p.result,
    pumpLine: p.pumpLine,
    filledFromPumpLine: p.filledFromPumpLine,
    coreVersion: p.coreVersion,
    notes: notes.map((n) => noteJson(n, c.users)),
  };
}

function summaryJson(p: PlanRow, c: Context, noteCount: number): PlanSummary {
  return {
    ...common(p, c),
    targetPairRate: p.request.targetPairRate ?? null,
    targetGainDb: p.request.targetGainDb ?? null,
    operatingFluxPhi0: p.result.operating_flux_phi0,
    operatingBias: p.result.operating_bias,
    pumpFrequencyHz: p.pumpFrequencyHz,
    pumpAmplitudePhi0: p.pumpAmplitudePhi0,
    generatorPowerDbm: p.generatorPowerDbm,
    predictedPairRate: p.predictedPairRate,
    warningCodes: p.result.warnings.map((w) => w.code),
    noteCount,
  };
}

async function loadPlanJson(em: EntityManager, labId: number, p: PlanRow): Promise<Plan> {
  const notes = (await notesOf(em, [p.id])).get(p.id) ?? [];
  const c = await context(em, labId, [p], notes.map((n) => n.authorId));
  return planJson(p, c, notes);
}

async function planInLab(em: EntityManager, labId: number, id: number): Promise<PlanRow> {
  const p = await findPlanInLab(em, labId, id);
  if (!p) throw AppError.notFound(`no plan ${id} in your lab`);
  return p;
}

export async function getPlan(ds: DataSource, labId: number, id: number): Promise<Plan> {
  return loadPlanJson(ds.manager, labId, await planInLab(ds.manager, labId, id));
}

export async function listPlans(ds: DataSource, labId: number, deviceId?: number): Promise<PlanSummary[]> {
  const em = ds.manager;
  if (deviceId !== undefined) await deviceInLab(em, labId, deviceId);
  const rows = await listPlansOfLab(em, labId, deviceId);
  const [c, counts] = await Promise.all([context(em, labId, rows), noteCounts(em, rows.map((p) => p.id))]);
  return rows.map((p) => summaryJson(p, c, counts.get(p.id) ?? 0));
}

// ---------------------------------------------------------------------------------------------
// Saving

async function insertPlan(em: EntityManager, actor: UserRow, c: Computed, replannedFromId: number | null, note: string | undefined): Promise<number> {
  const r = c.result;
  const { identifiers } = await em.getRepository(PlanEntity).insert({
    labId: actor.labId,
    deviceId: c.device.id,
    fitId: c.fit.id,
    authorId: actor.id,
    mode: c.request.mode,
    request: c.request as never,
    result: r as never,
    pumpLine: c.pumpLine as never,
    filledFromPumpLine: c.filled,
    predictedPairRate: r.predicted_pair_rate,
    pumpFrequencyHz: r.pump_frequency_hz,
    pumpAmplitudePhi0: r.pump_amplitude_phi0,
    generatorPowerDbm: r.generator_power_dbm !== null && Number.isFinite(r.generator_power_dbm) ? r.generator_power_dbm : null,
    coreVersion: CORE_VERSION,
    replannedFromId,
  });
  const id = identifiers[0].id as number;
  if (note) await em.getRepository(PlanNoteEntity).insert({ planId: id, authorId: actor.id, text: note });
  return id;
}

const auditDetails = (c: Computed) => ({
  device: c.device.name,
  fitId: c.fit.id,
  fitVersion: c.fit.version,
  mode: c.request.mode,
  targetPairRate: c.request.targetPairRate ?? null,
  targetGainDb: c.request.targetGainDb ?? null,
  predictedPairRate: c.result.predicted_pair_rate,
  generatorPowerDbm: c.result.generator_power_dbm,
  warnings: c.result.warnings.map((w) => w.code),
  filledFromPumpLine: c.filled,
});

/** POST /api/plans: recompute with the core on the device's accepted calibration, store, audit. */
export async function savePlan(ds: DataSource, actor: UserRow, body: SavePlanRequest): Promise<Plan> {
  const c = await compute(ds.manager, actor.labId, body.deviceId, body.request);
  const id = await ds.transaction(async (em) => {
    const id = await insertPlan(em, actor, c, null, body.note);
    await recordAudit(em, { labId: actor.labId, actorId: actor.id, action: 'plan.save', subjectType: 'plan', subjectId: id, details: auditDetails(c) });
    return id;
  });
  return getPlan(ds, actor.labId, id);
}

/** POST /api/plans/:id/replan: the old plan's request on the device's current accepted calibration. */
export async function replan(ds: DataSource, actor: UserRow, planId: number, body: ReplanRequest): Promise<Plan> {
  const old = await planInLab(ds.manager, actor.labId, planId);
  // The stored request already carries what the pump line filled then: the same inputs, verbatim.
  const c = await compute(ds.manager, actor.labId, old.deviceId, old.request, false);
  c.filled = old.filledFromPumpLine;
  c.pumpLine = old.pumpLine;
  const id = await ds.transaction(async (em) => {
    const id = await insertPlan(em, actor, c, old.id, body.note);
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'plan.replan',
      subjectType: 'plan',
      subjectId: id,
      details: { ...auditDetails(c), replannedFrom: old.id, fromFitId: old.fitId },
    });
    return id;
  });
  return getPlan(ds, actor.labId, id);
}

/** POST /api/plans/:id/notes: the plan's author or a lab lead. */
export async function addNote(ds: DataSource, actor: UserRow, planId: number, body: NoteRequest): Promise<PlanNote> {
  const p = await planInLab(ds.manager, actor.labId, planId);
  if (actor.role !== 'lab_lead' && p.authorId !== actor.id) throw AppError.forbidden('only the plan’s author or a lab lead may annotate it');
  const id = await ds.transaction(async (em) => {
    const { identifiers } = await em.getRepository(PlanNoteEntity).insert({ planId: p.id, authorId: actor.id, text: body.text });
    const id = identifiers[0].id as number;
    await recordAudit(em, { labId: actor.labId, actorId: actor.id, action: 'plan.note', subjectType: 'plan', subjectId: p.id, details: { noteId: id, length: body.text.length } });
    return id;
  });
  const n = await ds.getRepository(PlanNoteEntity).findOneByOrFail({ id });
  return noteJson(n, new Map([[actor.id, actor]]));
}

export interface ExportFile {
  filename: string;
  contentType: string;
  body: string;
}

export async function exportPlan(ds: DataSource, actor: UserRow, planId: number): Promise<ExportFile> {
  const plan = await getPlan(ds, actor.labId, planId);
  await ds.transaction((em) =>
    recordAudit(em, { labId: actor.labId, actorId: actor.id, action: 'plan.export', subjectType: 'plan', subjectId: plan.id, details: { device: plan.deviceName, fitVersion: plan.fitVersion } }),
  );
  return {
    filename: `${plan.deviceName.replace(/[^A-Za-z0-9._-]+/g, '_')}_plan-${plan.id}.json`,
    contentType: 'application/json; charset=utf-8',
    body: JSON.stringify(plan, null, 2) + '\n',
  };
}

// ---------------------------------------------------------------------------------------------
// Pump lines

function pumpLineRecord(p: PumpLineRow, users: Map<number, UserRow>): PumpLineRecord {
  const u = p.updatedById !== null ? users.get(p.updatedById) : undefined;
  return { ...pumpLineJson(p), deviceId: p.deviceId, updatedBy: u ? { id: u.id, name: u.name } : null, updatedAt: iso(p.updatedAt) };
}

export async function getPumpLine(ds: DataSource, labId: number, deviceId: number): Promise<PumpLineRecord | null> {
  const device = await deviceInLab(ds.manager, labId, deviceId);
  const p = await pumpLineOf(ds.manager, device.id);
  return p ? pumpLineRecord(p, await usersById(ds.manager, [p.updatedById])) : null;
}

export async function putPumpLine(ds: DataSource, actor: UserRow, deviceId: number, body: PumpLine): Promise<PumpLineRecord> {
  const device = await deviceInLab(ds.manager, actor.labId, deviceId);
  await ds.transaction(async (em) => {
    const repo = em.getRepository(PumpLineEntity);
    const values = { ...body, labId: actor.labId, deviceId: device.id, updatedById: actor.id };
    // One row per device: insert, or replace on the unique key (two PUTs at once: the last wins).
    await repo.upsert(values as never, { conflictPaths: ['deviceId'] });
    await recordAudit(em, { labId: actor.labId, actorId: actor.id, action: 'pump_line.put', subjectType: 'device', subjectId: device.id, details: { device: device.name, ...body } });
  });
  const p = (await pumpLineOf(ds.manager, device.id))!;
  return pumpLineRecord(p, new Map([[actor.id, actor]]));
}
