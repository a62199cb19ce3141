// Finishing a fit job: store the fit (next version under the device lock), close the job, audit, e-mail.
import type { DataSource, EntityManager } from 'typeorm';
import type { CalibrationJson } from '@/calibration/contract';
import type { FitOptions } from '@/shared/api/calibration';
import type { Config } from '../../config';
import { DeviceEntity, FitEntity, JobEntity, SweepEntity, type FitRow, type JobRow } from '../../db/entities';
import type { Mailer } from '../../mail/mailer';
import { recordAudit } from '../audit/service';
import type { WorkerError } from '../../jobs/calibrationWorker';
import { headline } from './json';
import { notifyFitProposed } from './notify';
import { lockDevice, nextFitVersion } from './repository';

export interface NewFit {
  labId: number;
  deviceId: number;
  sweepId: number;
  options: FitOptions;
  calibration: CalibrationJson;
  createdById: number | null;
}

const finiteOrNull = (x: unknown): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);

/** Insert a proposed fit with the device's next version. Locks the device row: call inside a transaction. */
export async function insertFit(em: EntityManager, f: NewFit): Promise<FitRow> {
  if (!(await lockDevice(em, f.deviceId))) throw new Error(`device ${f.deviceId} no longer exists`);
  const version = await nextFitVersion(em, f.deviceId);
  const cal = f.calibration;
  const repo = em.getRepository(FitEntity);
  const { identifiers } = await repo.insert({
    labId: f.labId,
    deviceId: f.deviceId,
    sweepId: f.sweepId,
    version,
    kind: cal.kind,
    model: cal.model,
    options: f.options,
    // TypeORM's deep-partial insert type trips over the JSON's index signatures; the value is the full JSON.
    calibration: cal as never,
    f0Hz: finiteOrNull(cal.params.f0_hz?.value),
    gamma0: finiteOrNull(cal.params.gamma0?.value),
    asymmetry: finiteOrNull(cal.params.asymmetry?.value),
    redchi: finiteOrNull(cal.redchi),
    ndata: cal.ndata,
    outlierCount: cal.outliers.length,
    success: !!cal.success,
    coreVersion: cal.core_version,
    status: 'proposed',
    createdById: f.createdById,
    reviewedById: null,
    reviewedAt: null,
    reviewComment: null,
    supersededByFitId: null,
    supersededAt: null,
  });
  return repo.findOneByOrFail({ id: identifiers[0].id as number });
}

export async function completeFitJob(
  ds: DataSource,
  mailer: Mailer,
  config: Pick<Config, 'appUrl'>,
  job: JobRow,
  calibration: CalibrationJson,
  log: (msg: string, err?: unknown) => void,
): Promise<FitRow | null> {
  const sweep = await ds.getRepository(SweepEntity).findOneBy({ id: job.sweepId });
  if (!sweep) {
    await failFitJob(ds, job, { kind: 'internal', message: `sweep ${job.sweepId} was deleted`, issues: [] });
    return null;
  }
  const fit = await ds.transaction(async (em) => {
    const row = await insertFit(em, {
      labId: sweep.labId,
      deviceId: sweep.deviceId,
      sweepId: sweep.id,
      options: job.options,
      calibration,
      createdById: job.createdById,
    });
    const closed = await em
      .getRepository(JobEntity)
      .update(
        { id: job.id, status: 'running' },
        { status: 'succeeded', progress: 1, fitId: row.id, finishedAt: new Date(), message: `fit v${row.version} proposed` },
      );
    // Someone else finished or failed this job meanwhile: keep their outcome, drop this fit.
    if (!closed.affected) throw new JobLost();
    await recordAudit(em, {
      labId: sweep.labId,
      actorId: job.createdById,
      action: 'fit.create',
      subjectType: 'fit',
      subjectId: row.id,
      details: { device: sweep.deviceId, sweep: sweep.id, job: job.id, version: row.version, model: row.model, kind: row.kind, result: headline(calibration) },
    });
    return row;
  }).catch((e) => {
    if (e instanceof JobLost) return null;
    throw e;
  });
  if (fit) {
    const device = await ds.getRepository(DeviceEntity).findOneBy({ id: fit.deviceId });
    if (device) void notifyFitProposed(ds, mailer, config, fit, device, job.createdById).catch((e) => log(`fit ${fit.id}: notification failed`, e));
  }
  return fit;
}

class JobLost extends Error {}

export async function failFitJob(ds: DataSource, job: JobRow, error: WorkerError): Promise<void> {
  await ds.transaction(async (em) => {
    const r = await em
      .getRepository(JobEntity)
      .update({ id: job.id, status: 'running' }, { status: 'failed', finishedAt: new Date(), message: error.message.slice(0, 2000) });
    if (!r.affected) return;
    await recordAudit(em, {
      labId: job.labId,
      actorId: job.createdById,
      action: 'fit.failed',
      subjectType: 'job',
      subjectId: job.id,
      details: { sweep: job.sweepId, kind: error.kind, message: error.message.slice(0, 1000) },
    });
  });
}
