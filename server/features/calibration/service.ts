import { createHash } from 'node:crypto';
import Papa from 'papaparse';
import type { DataSource } from 'typeorm';
import type { CalibrationJson, ValueWithError } from '@/calibration/contract';
import type { SweepData } from '@/calibration/io';
import type {
  Fit, FitComparison, FitDetail, FitOptions, Job, ParameterComparison, RefitRequest, ReviewRequest, Sweep, UploadOptions,
} from '@/shared/api/calibration';
import type { Config } from '../../config';
import { CooldownEntity, DeviceEntity, FitEntity, JobEntity, SweepEntity, SweepFileEntity, type DeviceRow, type FitRow, type JobRow, type SweepRow, type UserRow } from '../../db/entities';
import { AppError } from '../../http/errors';
import type { JobRunner } from '../../jobs/runner';
import type { Mailer } from '../../mail/mailer';
import { recordAudit } from '../audit/service';
import { findDevices } from '../devices/repository';
import { headline, toFitJson, toJobJson, toSweepJson } from './json';
import { notifyCalibrationAccepted } from './notify';
import {
  acceptedFitOf, fileInfoOf, findFitInLab, findJobInLab, findSweepInLab, listFitsOfDevice, listSweepsOfDevice, lockDevice, usersById,
} from './repository';

export interface UploadedFile {
  originalname: string;
  buffer: Buffer;
  size: number;
}

export interface CalibrationDeps {
  dataSource: DataSource;
  jobs: JobRunner;
  mailer: Mailer;
  config: Pick<Config, 'appUrl' | 'uploadLimitMb' | 'fitWaitMs'>;
  log?: (msg: string, err?: unknown) => void;
}

const sha256 = (b: Uint8Array | string) => createHash('sha256').update(b).digest('hex');

async function deviceInLab(ds: DataSource, labId: number, id: number): Promise<DeviceRow> {
  const [d] = await findDevices(ds.manager, labId, { id });
  if (!d) throw AppError.notFound(`no device ${id} in your lab`);
  return d;
}

function defined<T extends object>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}

// ---------------------------------------------------------------------------------------------
// JSON with the names and users resolved

export async function sweepJson(ds: DataSource, s: SweepRow): Promise<Sweep> {
  const [files, users] = await Promise.all([fileInfoOf(ds.manager, [s.id]), usersById(ds.manager, [s.uploadedById])]);
  return toSweepJson(s, files.get(s.id) ?? [], users);
}

export async function fitsJson(ds: DataSource, rows: FitRow[]): Promise<Fit[]> {
  const users = await usersById(ds.manager, rows.flatMap((f) => [f.createdById, f.reviewedById]));
  const deviceIds = [...new Set(rows.map((f) => f.deviceId))];
  const devices = deviceIds.length ? await ds.getRepository(DeviceEntity).findBy(deviceIds.map((id) => ({ id }))) : [];
  const names = new Map(devices.map((d) => [d.id, d.name]));
  return rows.map((f) => toFitJson(f, names.get(f.deviceId) ?? '', users));
}

async function fitJson(ds: DataSource, f: FitRow): Promise<Fit> {
  return (await fitsJson(ds, [f]))[0];
}

// ---------------------------------------------------------------------------------------------
// Upload

/** Options the fits of a new sweep run with: the request's, then the device's design values. */
function uploadFitOptions(req: UploadOptions, device: DeviceRow): FitOptions {
  return defined({
    kind: req.kind,
    model: req.model ?? 'exact',
    symmetric: req.symmetric,
    z0Ohm: req.z0Ohm ?? device.designZ0Ohm ?? undefined,
    geometry: req.geometry,
    probeFrequencyHz: req.probeFrequencyHz,
    loss: req.loss,
    loopInductanceH: device.loopInductanceH ?? undefined,
    biasPattern: req.biasPattern,
    biasUnit: req.biasUnit,
  }) as FitOptions;
}

export interface StartedFit {
  status: 201 | 202;
  body: { sweep: Sweep; job: Job; fit?: Fit };
}

async function waitAndAnswer(d: CalibrationDeps, sweep: SweepRow, jobId: number, preparsed?: SweepData): Promise<StartedFit> {
  d.jobs.enqueue(jobId, preparsed);
  const job = (await d.jobs.waitFor(jobId, d.config.fitWaitMs)) as JobRow;
  const body: StartedFit['body'] = { sweep: await sweepJson(d.dataSource, sweep), job: toJobJson(job) };
  const finished = job.status === 'succeeded' || job.status === 'failed';
  if (job.status === 'succeeded' && job.fitId !== null) {
    const fit = await d.dataSource.getRepository(FitEntity).findOneByOrFail({ id: job.fitId });
    body.fit = await fitJson(d.dataSource, fit);
  }
  return { status: finished ? 201 : 202, body };
}

export async function uploadSweep(
  d: CalibrationDeps,
  actor: UserRow,
  deviceId: number,
  files: UploadedFile[],
  req: UploadOptions,
): Promise<StartedFit> {
  const ds = d.dataSource;
  const device = await deviceInLab(ds, actor.labId, deviceId);
  if (req.cooldownId !== undefined) {
    const c = await ds.getRepository(CooldownEntity).findOneBy({ id: req.cooldownId, deviceId: device.id });
    if (!c) throw AppError.validation([{ path: 'cooldownId', message: `no cooldown ${req.cooldownId} on device ${device.name}` }]);
  }
  if (!files.length) {
    throw AppError.validation([{ path: 'files', message: 'attach the sweep file(s) in the multipart field "files"' }]);
  }
  const total = files.reduce((s, f) => s + f.size, 0);
  if (total > d.config.uploadLimitMb * 1024 * 1024) {
    throw new AppError(
      413,
      'PAYLOAD_TOO_LARGE',
      `the ${files.length} files together are ${(total / 1048576).toFixed(1)} MB; the upload limit is ${d.config.uploadLimitMb} MB (FW_UPLOAD_LIMIT_MB)`,
    );
  }
  const names = files.map((f) => f.originalname || 'upload');
  const options = uploadFitOptions(req, device);

  const parsed = await d.jobs.parse(files.map((f, i) => ({ name: names[i], content: f.buffer })), options);
  let refusal: AppError | null = null;
  if (!parsed.ok) {
    refusal = new AppError(422, 'SWEEP_INVALID', parsed.error.message, { issues: parsed.error.issues });
  } else if (parsed.value.summary.kind === 'phase_flux' && !parsed.value.summary.probeFrequencyHz) {
    refusal = AppError.validation(
      [{ path: 'probeFrequencyHz', message: `${names[0]} states no probe frequency: give probeFrequencyHz (Hz)` }],
    );
  }
  if (refusal) {
    // A refused upload stores nothing but the trail of the attempt.
    await ds.transaction((em) =>
      recordAudit(em, {
        labId: actor.labId,
        actorId: actor.id,
        action: 'sweep.rejected',
        subjectType: 'device',
        subjectId: device.id,
        details: { files: names, bytes: total, message: refusal.message.slice(0, 1000) },
      }),
    );
    throw refusal;
  }
  const { summary, data } = parsed.ok ? parsed.value : (undefined as never);
  const fileShas = files.map((f) => sha256(f.buffer));
  const setSha = files.length === 1 ? fileShas[0] : sha256(names.map((n, i) => `${n}:${fileShas[i]}`).sort().join('\n'));
  // The re-parse in the job must read the files the same way the upload did.
  const jobOptions: FitOptions = { ...options, kind: summary.kind };

  const { sweep, jobId } = await ds.transaction(async (em) => {
    const { identifiers } = await em.getRepository(SweepEntity).insert({
      labId: actor.labId,
      deviceId: device.id,
      cooldownId: req.cooldownId ?? null,
      uploadedById: actor.id,
      kind: summary.kind,
      fileNames: names,
      fileCount: files.length,
      byteSize: total,
      sha256: setSha,
      biasUnit: summary.biasUnit || null,
      parseSummary: summary,
      options: jobOptions,
      note: req.note ?? null,
    });
    const sweepId = identifiers[0].id as number;
    // One INSERT per file: a set of many small files stays well below max_allowed_packet per row.
    for (let i = 0; i < files.length; i++) {
      await em.getRepository(SweepFileEntity).insert({
        sweepId,
        position: i,
        name: names[i],
        byteSize: files[i].size,
        sha256: fileShas[i],
        content: files[i].buffer,
      });
    }
    const job = await em.getRepository(JobEntity).insert({
      labId: actor.labId,
      type: 'fit_upload',
      status: 'queued',
      progress: 0,
      message: 'queued',
      sweepId,
      fitId: null,
      options: jobOptions,
      sourceFitId: null,
      attempts: 0,
      createdById: actor.id,
    });
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'sweep.upload',
      subjectType: 'sweep',
      subjectId: sweepId,
      details: { device: device.name, kind: summary.kind, files: names.length, bytes: total, sha256: setSha, points: summary.points },
    });
    return { sweep: await em.getRepository(SweepEntity).findOneByOrFail({ id: sweepId }), jobId: job.identifiers[0].id as number };
  });
  return waitAndAnswer(d, sweep, jobId, data);
}

export async function listSweeps(ds: DataSource, labId: number, deviceId: number): Promise<Sweep[]> {
  const device = await deviceInLab(ds, labId, deviceId);
  const rows = await listSweepsOfDevice(ds.manager, device.id);
  const [files, users] = await Promise.all([fileInfoOf(ds.manager, rows.map((s) => s.id)), usersById(ds.manager, rows.map((s) => s.uploadedById))]);
  return rows.map((s) => toSweepJson(s, files.get(s.id) ?? [], users));
}

// ---------------------------------------------------------------------------------------------
// Refit, jobs, fits

export async function refit(d: CalibrationDeps, actor: UserRow, fitId: number, req: RefitRequest): Promise<StartedFit> {
  const ds = d.dataSource;
  const source = await findFitInLab(ds.manager, actor.labId, fitId);
  if (!source) throw AppError.notFound(`no fit ${fitId} in your lab`);
  const sweep = await ds.getRepository(SweepEntity).findOneByOrFail({ id: source.sweepId });
  const options: FitOptions = { ...source.options, ...(defined(req) as FitOptions) };
  const jobId = await ds.transaction(async (em) => {
    const job = await em.getRepository(JobEntity).insert({
      labId: actor.labId,
      type: 'refit',
      status: 'queued',
      progress: 0,
      message: 'queued',
      sweepId: sweep.id,
      fitId: null,
      options,
      sourceFitId: source.id,
      attempts: 0,
      createdById: actor.id,
    });
    const id = job.identifiers[0].id as number;
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'fit.refit',
      subjectType: 'job',
      subjectId: id,
      details: { fromFit: source.id, fromVersion: source.version, sweep: sweep.id, changed: defined(req) },
    });
    return id;
  });
  return waitAndAnswer(d, sweep, jobId);
}

export async function getJob(ds: DataSource, labId: number, id: number): Promise<{ job: Job; fit?: Fit }> {
  const job = await findJobInLab(ds.manager, labId, id);
  if (!job) throw AppError.notFound(`no job ${id} in your lab`);
  const out: { job: Job; fit?: Fit } = { job: toJobJson(job) };
  if (job.fitId !== null) {
    const fit = await ds.getRepository(FitEntity).findOneBy({ id: job.fitId });
    if (fit) out.fit = await fitJson(ds, fit);
  }
  return out;
}

export async function listFits(ds: DataSource, labId: number, deviceId: number): Promise<Fit[]> {
  const device = await deviceInLab(ds, labId, deviceId);
  return fitsJson(ds, await listFitsOfDevice(ds.manager, device.id));
}

export async function getFit(ds: DataSource, labId: number, id: number): Promise<FitDetail> {
  const f = await findFitInLab(ds.manager, labId, id);
  if (!f) throw AppError.notFound(`no fit ${id} in your lab`);
  return { ...(await fitJson(ds, f)), calibration: f.calibration };
}

/** The device's accepted calibration JSON, exactly as stored, with its fit id and version. */
export async function activeCalibration(ds: DataSource, labId: number, deviceId: number): Promise<{ fit: FitRow; calibration: CalibrationJson }> {
  const device = await deviceInLab(ds, labId, deviceId);
  const fit = await acceptedFitOf(ds.manager, device.id);
  if (!fit) throw new AppError(404, 'NO_ACTIVE_CALIBRATION', `device ${device.name} has no accepted calibration yet`);
  return { fit, calibration: fit.calibration };
}

// ---------------------------------------------------------------------------------------------
// Review

interface LockedFitState {
  status: FitRow['status'];
}

/**
 * Accept or reject a proposed fit. The device row is locked first (SELECT … FOR UPDATE), so two
 * reviews of fits of one device run one after the other: the second sees the first's outcome, and
 * accepting supersedes the previously accepted fit in the same transaction. A device therefore has
 * at most one accepted fit, whatever the timing.
 */
export async function reviewFit(d: CalibrationDeps, actor: UserRow, fitId: number, req: ReviewRequest): Promise<Fit> {
  const ds = d.dataSource;
  const found = await findFitInLab(ds.manager, actor.labId, fitId);
  if (!found) throw AppError.notFound(`no fit ${fitId} in your lab`);
  const now = new Date();
  const comment = req.comment ? req.comment : null;
  await ds.transaction(async (em) => {
    await lockDevice(em, found.deviceId);
    // Locking reads: they see what a review that held the lock before us committed.
    const [state] = (await em.query('SELECT `status` FROM `fit` WHERE `id` = ? FOR UPDATE', [fitId])) as LockedFitState[];
    if (state.status !== 'proposed') {
      throw AppError.conflict(`fit v${found.version} is ${state.status}; only a proposed fit can be reviewed`, { status: state.status });
    }
    if (req.decision === 'accept' && !found.success) {
      throw AppError.conflict(
        `fit v${found.version} did not converge (${found.calibration.message}); refit it with other options or reject it`,
        { status: state.status, success: false },
      );
    }
    let replaced: number[] = [];
    if (req.decision === 'accept') {
      const prev = (await em.query("SELECT `id` FROM `fit` WHERE `deviceId` = ? AND `status` = 'accepted' FOR UPDATE", [found.deviceId])) as Array<{ id: number }>;
      replaced = prev.map((p) => Number(p.id));
      for (const id of replaced) {
        await em.getRepository(FitEntity).update({ id, status: 'accepted' }, { status: 'superseded', supersededByFitId: fitId, supersededAt: now });
      }
    }
    await em.getRepository(FitEntity).update(
      { id: fitId, status: 'proposed' },
      { status: req.decision === 'accept' ? 'accepted' : 'rejected', reviewedById: actor.id, reviewedAt: now, reviewComment: comment },
    );
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: req.decision === 'accept' ? 'fit.accept' : 'fit.reject',
      subjectType: 'fit',
      subjectId: fitId,
      details: { device: found.deviceId, version: found.version, comment, superseded: replaced },
    });
    return replaced;
  });
  const fit = await ds.getRepository(FitEntity).findOneByOrFail({ id: fitId });
  if (req.decision === 'accept') {
    const device = await ds.getRepository(DeviceEntity).findOneByOrFail({ id: fit.deviceId });
    const log = d.log ?? ((m: string, e?: unknown) => console.error(m, e));
    void notifyCalibrationAccepted(ds, d.mailer, d.config, fit, device, actor.name).catch((e) => log(`fit ${fit.id}: notification failed`, e));
  }
  return fitJson(ds, fit);
}

// ---------------------------------------------------------------------------------------------
// Compare

const family = (model: string) => (model === 'phase' ? 'phase' : 'tuning');
const BIAS_UNIT_PARAMS = new Set(['flux_period', 'flux_offset']);

/**
 * Compare two fits parameter by parameter. Allowed when the fits share a parameter set: both
 * tuning-curve fits (exact/approx model, any input kind) or both phase fits — of the same device
 * (drift between sweeps, models, cooldowns) or of different devices (spread within or across
 * batches). Tuning against phase has no common fitted quantity and is refused (422 NOT_COMPARABLE).
 */
export async function compareFits(ds: DataSource, labId: number, aId: number, bId: number): Promise<FitComparison> {
  const [a, b] = await Promise.all([findFitInLab(ds.manager, labId, aId), findFitInLab(ds.manager, labId, bId)]);
  if (!a) throw AppError.notFound(`no fit ${aId} in your lab`);
  if (!b) throw AppError.notFound(`no fit ${bId} in your lab`);
  if (family(a.model) !== family(b.model)) {
    throw new AppError(
      422,
      'NOT_COMPARABLE',
      `fit ${a.id} is a ${family(a.model)} fit and fit ${b.id} a ${family(b.model)} fit: they share no fitted parameter`,
    );
  }
  const notes: string[] = [];
  const sameUnit = a.calibration.bias_unit === b.calibration.bias_unit;
  if (!sameUnit) notes.push(`bias units differ (${a.calibration.bias_unit} vs ${b.calibration.bias_unit}): flux_period and flux_offset are left out`);
  if (a.sweepId === b.sweepId) notes.push('both fits come from the same sweep: their errors are correlated, so the combined error (which treats them as independent) overstates the uncertainty of the difference');
  if (a.deviceId !== b.deviceId) notes.push('fits of different devices: differences show device-to-device spread, not drift');
  const parameters: ParameterComparison[] = [];
  for (const [name, pa] of Object.entries(a.calibration.params) as Array<[string, ValueWithError]>) {
    const pb = b.calibration.params[name] as ValueWithError | undefined;
    if (!pb || typeof pa?.value !== 'number' || typeof pb.value !== 'number') continue;
    if (!sameUnit && BIAS_UNIT_PARAMS.has(name)) continue;
    const sa = pa.stderr ?? null;
    const sb = pb.stderr ?? null;
    const combined = sa !== null && sb !== null ? Math.hypot(sa, sb) : null;
    const difference = pb.value - pa.value;
    parameters.push({
      name,
      a: { value: pa.value, stderr: sa },
      b: { value: pb.value, stderr: sb },
      difference,
      combinedStderr: combined,
      differenceInSigma: combined !== null && combined > 0 ? difference / combined : null,
    });
  }
  const [fa, fb] = await fitsJson(ds, [a, b]);
  return { a: fa, b: fb, sameDevice: a.deviceId === b.deviceId, sameSweep: a.sweepId === b.sweepId, parameters, notes };
}

// ---------------------------------------------------------------------------------------------
// Export

export interface ExportFile {
  filename: string;
  contentType: string;
  body: string;
}

function safeName(s: string): string {
  return s.replace(/[^A-Za-z0-9._-]+/g, '_');
}

export function calibrationCsv(cal: CalibrationJson, title: string): string {
  const params = Papa.unparse({
    fields: ['parameter', 'value', 'stderr', 'vary'],
    data: Object.entries(cal.params).map(([k, p]) => [k, p.value, p.stderr ?? '', p.vary === undefined ? '' : String(p.vary)]),
  });
  const points = Papa.unparse({
    fields: ['index', 'row', 'bias', 'flux_phi0', 'measured', 'sigma', 'model', 'residual', 'outlier'],
    data: cal.points.map((p) => [p.index, p.row ?? '', p.bias, p.flux_phi0, p.measured, p.sigma ?? '', p.model, p.residual, String(p.outlier)]),
  });
  const measured = cal.model === 'phase' ? 'measured and model: reflected phase in rad' : 'measured and model: resonance frequency in Hz';
  return [
    `# ${title}`,
    `# schema ${cal.schema}, core ${cal.core_version}, kind ${cal.kind}, model ${cal.model}, bias unit ${cal.bias_unit}`,
    '# parameters',
    params,
    '',
    `# points (${measured})`,
    points,
    '',
  ].join('\r\n');
}

export async function exportFit(ds: DataSource, actor: UserRow, fitId: number, format: 'json' | 'csv'): Promise<ExportFile> {
  const fit = await findFitInLab(ds.manager, actor.labId, fitId);
  if (!fit) throw AppError.notFound(`no fit ${fitId} in your lab`);
  const device = await ds.getRepository(DeviceEntity).findOneByOrFail({ id: fit.deviceId });
  const base = safeName(`${device.name}_fit-v${fit.version}`);
  const file: ExportFile =
    format === 'json'
      ? { filename: `${base}.json`, contentType: 'application/json; charset=utf-8', body: JSON.stringify(fit.calibration, null, 2) + '\n' }
      : {
          filename: `${base}.csv`,
          contentType: 'text/csv; charset=utf-8',
          body: calibrationCsv(fit.calibration, `Fluxwright fit v${fit.version} of device ${device.name} (${fit.status}): ${headline(fit.calibration)}`),
        };
  await ds.transaction((em) =>
    recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'fit.export',
      subjectType: 'fit',
      subjectId: fit.id,
      details: { format, device: device.name, version: fit.version },
    }),
  );
  return file;
}
