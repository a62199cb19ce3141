// Demo planning data: pump lines for two demo devices, two spec windows, and three drive plans by
// the demo experimentalist, one of them made on a calibration version that has since been replaced
// (so it shows as stale). The replacement is a re-measurement of Q7-L1 after a thermal cycle
// (synthetic, clearly marked invented), fitted through the same pipeline the jobs use.
// Idempotent: skipped when the demo lab already has plans; needs the demo calibrations.
import { createHash } from 'node:crypto';
import type { DataSource, EntityManager } from 'typeorm';
import { calibrateSweepData, parseSweepFiles } from '@/calibration/pipeline';
import { planFromCalibration } from '@/calibration/planner';
import type { PlanRequest } from '@/calibration/planner/types';
import { phaseFluxCsv } from '@/calibration/synth';
import { CORE_VERSION } from '@/calibration/version';
import type { FitOptions } from '@/shared/api/calibration';
import type { PumpLine } from '@/shared/api/planning';
import { recordAudit } from '../features/audit/service';
import { insertFit } from '../features/calibration/fitStore';
import { fillFromPumpLine } from '../features/planning/compute';
import { summarise } from '../jobs/calibrationWorker';
import { coreOptions } from '../jobs/runner';
import {
  CooldownEntity, DeviceEntity, FitEntity, JobEntity, PlanEntity, PlanNoteEntity, PumpLineEntity, SpecWindowEntity, SweepEntity, SweepFileEntity, UserEntity,
  type PumpLineRow,
} from './entities';

// Invented pump lines in the usual range (common practice): an on-chip flux line with ~1.5 pH mutual
// inductance to the SQUID loop gives Φ0/M ≈ 1.4 mA per Φ0; 60–70 dB of attenuation, warm → cold.
const PUMP_LINES: Record<string, PumpLine> = {
  'Q4-R1': {
    dcPeriod: 1.4e-3, attenuationDb: [20, 10, 20, 20], stageNames: ['4 K', 'still', 'cold plate', 'mixing chamber'],
    thresholdPowerDbm: null, thresholdBias: null, coldStageLimitW: 1e-6, pumpLineZ0Ohm: 50,
    note: 'Demo pump line (invented): dc period from a flux-line bias sweep; attenuators as fitted in cooldown 1.',
  },
  'Q4-R2': {
    dcPeriod: null, attenuationDb: [20, 20, 20], stageNames: ['4 K', 'still', 'mixing chamber'],
    thresholdPowerDbm: -38.5, thresholdBias: 0.3, coldStageLimitW: 1e-6, pumpLineZ0Ohm: 50,
    note: 'Demo pump line (invented): parametric-oscillation onset seen on the spectrum analyser at 0.30 mA.',
  },
};

const SPEC_WINDOWS = [
  { param: 'gamma0', min: 0.03, max: 0.05 },
  { param: 'asymmetry', min: null, max: 0.12 },
];

interface DemoPlan {
  device: string;
  request: PlanRequest;
  note: string;
  at: string;
}

const PLANS: DemoPlan[] = [
  // Made on Q7-L1 v1, before the thermal cycle moved its flux offset: stale once v2 is accepted.
  {
    device: 'Q7-L1', at: '2026-06-18T14:00:00Z',
    request: { mode: 'line', fluxPhi0: 0.3, targetPairRate: 1e4, pumpFrequencyHz: 1.1e10, temperatureK: 0.02 },
    note: 'First look at the line: 10 kHz of pairs in the whole band below f_p.',
  },
  {
    device: 'Q4-R1', at: '2026-06-22T10:30:00Z',
    request: { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, temperatureK: 0.02 },
    note: 'Working point for the pair-rate calibration run; power chain from the pump line.',
  },
  {
    device: 'Q4-R2', at: '2026-06-23T16:15:00Z',
    request: { mode: 'cavity', bias: 0.35, targetGainDb: 15, temperatureK: 0.02 },
    note: 'Amplifier test: 15 dB phase-preserving gain; power from the measured threshold.',
  },
];

const sha256 = (b: Uint8Array | string) => createHash('sha256').update(b).digest('hex');

/** A second Q7-L1 sweep after a thermal cycle (trapped flux moved the offset), fitted and accepted. */
async function remeasureQ7L1(em: EntityManager, labId: number, engineer: number | null, lead: number | null): Promise<void> {
  const device = await em.getRepository(DeviceEntity).findOneByOrFail({ labId, name: 'Q7-L1' });
  const cooldown = await em.getRepository(CooldownEntity).findOne({ where: { deviceId: device.id }, order: { startedOn: 'DESC' } });
  const truth = {
    a: 0.28, alphaRad: 0.9, delayS: 52e-9, geometry: 'reflection' as const, biasUnit: 'mA', qi: 3.5e4, qcAbs: 1.2e4, phiRad: 0.12,
    f0Hz: 3.1e9, gamma0: 0.065, asymmetry: 0.18, fluxPeriod: 1.25, fluxOffset: 0.27,
  };
  const files = [{ name: 'Q7-L1_phase_after-cycle_demo.csv', text: phaseFluxCsv(truth, { biasMin: -1.5, biasMax: 1.5, points: 161, probeFrequencyHz: 5.5e9, noiseRad: 0.004, theta0Rad: 0.7, seed: 18 }) }];
  const options: FitOptions = { model: 'exact', z0Ohm: device.designZ0Ohm ?? undefined, loopInductanceH: device.loopInductanceH ?? undefined };
  const data = parseSweepFiles(files, coreOptions(options));
  const summary = summarise(data);
  const jobOptions: FitOptions = { ...options, kind: data.kind };
  const calibration = calibrateSweepData(data, coreOptions(jobOptions));
  const at = new Date('2026-06-24T09:00:00Z');
  const buf = Buffer.from(files[0].text, 'utf8');
  const sweep = await em.getRepository(SweepEntity).save({
    labId, deviceId: device.id, cooldownId: cooldown?.id ?? null, uploadedById: engineer, kind: data.kind, fileNames: [files[0].name], fileCount: 1,
    byteSize: buf.length, sha256: sha256(buf), biasUnit: summary.biasUnit || null, parseSummary: summary, options: jobOptions,
    note: 'Demo data (synthetic): re-measured after a thermal cycle to 4 K; the flux offset moved.', createdAt: at,
  });
  await em.getRepository(SweepFileEntity).insert({ sweepId: sweep.id, position: 0, name: files[0].name, byteSize: buf.length, sha256: sweep.sha256, content: buf });
  const fit = await insertFit(em, { labId, deviceId: device.id, sweepId: sweep.id, options: jobOptions, calibration, createdById: engineer });
  await em.getRepository(JobEntity).insert({
    labId, type: 'fit_upload', status: 'succeeded', progress: 1, message: `fit v${fit.version} proposed (demo seed)`, sweepId: sweep.id,
    fitId: fit.id, options: jobOptions, sourceFitId: null, attempts: 1, createdById: engineer, startedAt: at, finishedAt: at,
  });
  const reviewedAt = new Date(at.getTime() + 3600_000);
  await em.getRepository(FitEntity).update({ deviceId: device.id, status: 'accepted' }, { status: 'superseded', supersededByFitId: fit.id, supersededAt: reviewedAt });
  await em.getRepository(FitEntity).update(
    { id: fit.id },
    { status: 'accepted', reviewedById: lead, reviewedAt, reviewComment: 'Offset moved by ~0.06 mA after the thermal cycle, shape unchanged; accepting the new sweep.' },
  );
}

async function insertDemoPlan(em: EntityManager, labId: number, author: number, p: DemoPlan): Promise<void> {
  const device = await em.getRepository(DeviceEntity).findOneByOrFail({ labId, name: p.device });
  const fit = await em.getRepository(FitEntity).findOneOrFail({ where: { deviceId: device.id, status: 'accepted' }, order: { version: 'DESC' } });
  const pl = await em.getRepository(PumpLineEntity).findOneBy({ deviceId: device.id });
  const f = fillFromPumpLine(fit.calibration, p.request, pl as PumpLineRow | null);
  const result = planFromCalibration(fit.calibration, f.request);
  const createdAt = new Date(p.at);
  const { identifiers } = await em.getRepository(PlanEntity).insert({
    labId, deviceId: device.id, fitId: fit.id, authorId: author, mode: f.request.mode, request: f.request as never, result: result as never,
    pumpLine: f.pumpLine as never, filledFromPumpLine: f.filled, predictedPairRate: result.predicted_pair_rate, pumpFrequencyHz: result.pump_frequency_hz,
    pumpAmplitudePhi0: result.pump_amplitude_phi0, generatorPowerDbm: result.generator_power_dbm, coreVersion: CORE_VERSION, replannedFromId: null, createdAt,
  });
  await em.getRepository(PlanNoteEntity).insert({ planId: identifiers[0].id as number, authorId: author, text: p.note, createdAt });
}

export async function seedDemoPlanning(ds: DataSource, labName: string, emails: { experimentalist: string; engineer: string; lead: string }): Promise<{ created: boolean }> {
  return ds.transaction(async (em) => {
    const [lab] = (await em.query('SELECT `id` FROM `lab` WHERE `name` = ? FOR UPDATE', [labName])) as Array<{ id: number }>;
    if (!lab) return { created: false };
    if (await em.getRepository(PlanEntity).exists({ where: { labId: lab.id } })) return { created: false };
    const uid = async (email: string) => (await em.getRepository(UserEntity).findOneBy({ labId: lab.id, email }))?.id ?? null;
    const [exp, engineer, lead] = [await uid(emails.experimentalist), await uid(emails.engineer), await uid(emails.lead)];
    if (exp === null) return { created: false };
    // Needs the demo calibrations (an accepted fit on each planned device).
    for (const p of PLANS) {
      const d = await em.getRepository(DeviceEntity).findOneBy({ labId: lab.id, name: p.device });
      if (!d || !(await em.getRepository(FitEntity).exists({ where: { deviceId: d.id, status: 'accepted' } }))) return { created: false };
    }
    for (const [name, line] of Object.entries(PUMP_LINES)) {
      const d = await em.getRepository(DeviceEntity).findOneByOrFail({ labId: lab.id, name });
      await em.getRepository(PumpLineEntity).insert({ ...line, labId: lab.id, deviceId: d.id, updatedById: exp });
    }
    for (const w of SPEC_WINDOWS) {
      if (!(await em.getRepository(SpecWindowEntity).exists({ where: { labId: lab.id, param: w.param } }))) {
        await em.getRepository(SpecWindowEntity).insert({ ...w, labId: lab.id, updatedById: lead });
      }
    }
    await insertDemoPlan(em, lab.id, exp, PLANS[0]);
    await remeasureQ7L1(em, lab.id, engineer, lead);
    for (const p of PLANS.slice(1)) await insertDemoPlan(em, lab.id, exp, p);
    await recordAudit(em, { labId: lab.id, actorId: null, action: 'demo.seed_planning', subjectType: 'lab', subjectId: lab.id, details: { plans: PLANS.length, pumpLines: Object.keys(PUMP_LINES) } });
    return { created: true };
  });
}
