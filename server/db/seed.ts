// Demo data: one invented lab with one user of each role, two fabrication batches, seven devices
// with design values and one cooldown each, and demo calibrations: synthetic sweeps of every input
// kind (calibration/synth.ts, clearly marked invented) fitted through the pipeline, some accepted,
// one rejected. Idempotent: the lab is made once; the calibrations are added when the demo lab has
// no sweeps yet (so a database seeded before they existed gets them too).
//   npx tsx server/db/seed.ts   (migrates first)
import { createHash } from 'node:crypto';
import type { DataSource, EntityManager } from 'typeorm';
import type { CalibrationJson } from '@/calibration/contract';
import { calibrateSweepData, parseSweepFiles } from '@/calibration/pipeline';
import { phaseFluxCsv, rawComplexCsv, touchstoneSet, tuningPointsCsv, type SyntheticDevice } from '@/calibration/synth';
import type { FitOptions } from '@/shared/api/calibration';
import { insertFit } from '../features/calibration/fitStore';
import { coreOptions } from '../jobs/runner';
import { summarise } from '../jobs/calibrationWorker';
import type { Role } from '@/shared/api/common';
import type { Geometry } from '@/shared/api/devices';
import { hashPassword } from '../auth/passwords';
import { CooldownEntity, DeviceEntity, FabBatchEntity, FitEntity, JobEntity, LabEntity, SweepEntity, SweepFileEntity, UserEntity } from './entities';
import { recordAudit } from '../features/audit/service';
import { seedDemoPlanning } from './seedPlanning';

export const DEMO_LAB_NAME = 'Cryo Device Group (demo)';

export const DEMO_USERS: ReadonlyArray<{ email: string; password: string; name: string; role: Role }> = [
  { email: 'lead@demo.fluxwright.test', password: 'demo-lead-2026', name: 'Mira Okonkwo-Lind', role: 'lab_lead' },
  { email: 'engineer@demo.fluxwright.test', password: 'demo-engineer-2026', name: 'Tomas Vireo', role: 'device_engineer' },
  { email: 'experimentalist@demo.fluxwright.test', password: 'demo-exp-2026', name: 'Asha Pellworth', role: 'experimentalist' },
];

const BATCHES = [
  { code: 'NB-2611', wafer: 'W11 (Nb on high-resistivity Si)', fabricatedOn: '2026-03-18', processNotes: 'Nb 150 nm sputtered; Al/AlOx/Al junctions by double-angle evaporation; bridge-free mask.' },
  { code: 'NB-2614', wafer: 'W14 (Nb on sapphire)', fabricatedOn: '2026-05-06', processNotes: 'Same stack as NB-2611 with longer oxidation (lower critical current).' },
];

// Invented design values in the usual range for CPW λ/4 resonators with a dc-SQUID termination:
// Z0 ≈ 50 Ω, f ≈ 4–8 GHz, loop inductance tens of pH (common practice).
const DEVICES: ReadonlyArray<{
  name: string;
  batch: string;
  chipPosition: string;
  geometry: Geometry;
  designZ0Ohm: number;
  designFrequencyHz: number | null;
  loopInductanceH: number;
  fridge: string;
  startedOn: string;
}> = [
  { name: 'Q4-R1', batch: 'NB-2611', chipPosition: 'A3', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 6.02e9, loopInductanceH: 42e-12, fridge: 'Dilution fridge Aster', startedOn: '2026-04-02' },
  { name: 'Q4-R2', batch: 'NB-2611', chipPosition: 'A4', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 6.25e9, loopInductanceH: 42e-12, fridge: 'Dilution fridge Aster', startedOn: '2026-04-02' },
  { name: 'Q4-R3', batch: 'NB-2611', chipPosition: 'B1', geometry: 'quarter_wave', designZ0Ohm: 48.5, designFrequencyHz: 5.87e9, loopInductanceH: 38e-12, fridge: 'Dilution fridge Birch', startedOn: '2026-04-20' },
  { name: 'Q7-L1', batch: 'NB-2614', chipPosition: 'C2', geometry: 'phase_only', designZ0Ohm: 50, designFrequencyHz: null, loopInductanceH: 55e-12, fridge: 'Dilution fridge Birch', startedOn: '2026-05-21' },
  { name: 'Q7-R5', batch: 'NB-2614', chipPosition: 'C5', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 7.35e9, loopInductanceH: 60e-12, fridge: 'Dilution fridge Aster', startedOn: '2026-06-03' },
  { name: 'Q8-R2', batch: 'NB-2614', chipPosition: 'D2', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 6.1e9, loopInductanceH: 58e-12, fridge: 'Dilution fridge Birch', startedOn: '2026-06-10' },
  { name: 'Q8-R4', batch: 'NB-2614', chipPosition: 'D4', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 6.4e9, loopInductanceH: 58e-12, fridge: 'Dilution fridge Birch', startedOn: '2026-06-10' },
];

export async function seedDemo(ds: DataSource, opts: { bcryptCost: number }): Promise<{ created: boolean }> {
  if (await ds.getRepository(LabEntity).findOneBy({ name: DEMO_LAB_NAME })) {
    await seedDemoCalibrations(ds);
    await seedDemoPlanningOfLab(ds);
    return { created: false };
  }
  const hashes = await Promise.all(DEMO_USERS.map((u) => hashPassword(u.password, opts.bcryptCost)));
  await ds.transaction(async (em) => {
    // Re-check under the transaction: two servers starting at once must not seed twice
    // (the unique lab name makes the loser roll back).
    const lab = await em.getRepository(LabEntity).save({ name: DEMO_LAB_NAME });
    const users = [];
    for (let i = 0; i < DEMO_USERS.length; i++) {
      const u = DEMO_USERS[i];
      users.push(
        await em.getRepository(UserEntity).save({
          labId: lab.id,
          email: u.email,
          name: u.name,
          role: u.role,
          passwordHash: hashes[i],
          active: true,
        }),
      );
    }
    const engineer = users.find((u) => u.role === 'device_engineer')!;
    const batchIds = new Map<string, number>();
    for (const b of BATCHES) {
      const row = await em.getRepository(FabBatchEntity).save({ labId: lab.id, createdById: engineer.id, ...b });
      batchIds.set(b.code, row.id);
    }
    for (const d of DEVICES) {
      const dev = await em.getRepository(DeviceEntity).save({
        labId: lab.id,
        batchId: batchIds.get(d.batch)!,
        name: d.name,
        chipPosition: d.chipPosition,
        geometry: d.geometry,
        designZ0Ohm: d.designZ0Ohm,
        designFrequencyHz: d.designFrequencyHz,
        loopInductanceH: d.loopInductanceH,
        createdById: engineer.id,
      });
      await em.getRepository(CooldownEntity).save({
        deviceId: dev.id,
        startedOn: d.startedOn,
        fridge: d.fridge,
        notes: 'Demo cooldown: mounted in a copper sample box with a flux-bias coil.',
        createdById: engineer.id,
      });
    }
    await recordAudit(em, { labId: lab.id, actorId: null, action: 'demo.seed', subjectType: 'lab', subjectId: lab.id });
  });
  await seedDemoCalibrations(ds);
  await seedDemoPlanningOfLab(ds);
  return { created: true };
}

/** Pump lines, spec windows and plans of the demo lab (server/db/seedPlanning.ts), once. */
function seedDemoPlanningOfLab(ds: DataSource): Promise<{ created: boolean }> {
  const by = (role: Role) => DEMO_USERS.find((u) => u.role === role)!.email;
  return seedDemoPlanning(ds, DEMO_LAB_NAME, { experimentalist: by('experimentalist'), engineer: by('device_engineer'), lead: by('lab_lead') });
}

// ---------------------------------------------------------------------------------------------
// Demo calibrations. The "true" device parameters are invented, in the usual range for Nb CPW λ/4
// resonators with Al SQUIDs (common practice): γ0 a few %, d ≈ 0.05–0.2, flux period ≈ 1 mA of coil
// current. NB-2614 had a longer junction oxidation (lower I_c, larger L_s): larger γ0 than NB-2611.
// f0 is the bare λ/4 frequency, so the top of the tuning curve f0/(1+γ0) sits near the design value.

const CHAIN = { a: 0.28, alphaRad: 0.9, delayS: 52e-9, geometry: 'notch' as const, biasUnit: 'mA', qi: 3.5e4, qcAbs: 1.2e4, phiRad: 0.12 };
const DEMO_TRUTH: Record<string, SyntheticDevice> = {
  'Q4-R1': { ...CHAIN, f0Hz: 6.02e9 * 1.036, gamma0: 0.036, asymmetry: 0.08, fluxPeriod: 1.12, fluxOffset: 0.06 },
  'Q4-R2': { ...CHAIN, f0Hz: 6.25e9 * 1.034, gamma0: 0.034, asymmetry: 0.11, fluxPeriod: 1.09, fluxOffset: -0.04 },
  'Q4-R3': { ...CHAIN, f0Hz: 5.87e9 * 1.038, gamma0: 0.038, asymmetry: 0.06, fluxPeriod: 1.15, fluxOffset: 0.12 },
  'Q7-R5': { ...CHAIN, f0Hz: 7.35e9 * 1.055, gamma0: 0.055, asymmetry: 0.14, fluxPeriod: 0.98, fluxOffset: 0.09 },
  'Q8-R2': { ...CHAIN, qi: 2.6e4, f0Hz: 6.1e9 * 1.058, gamma0: 0.058, asymmetry: 0.12, fluxPeriod: 1.02, fluxOffset: -0.07 },
  'Q8-R4': { ...CHAIN, qi: 2.9e4, f0Hz: 6.4e9 * 1.061, gamma0: 0.061, asymmetry: 0.17, fluxPeriod: 1.0, fluxOffset: 0.03 },
  'Q7-L1': { ...CHAIN, geometry: 'reflection', f0Hz: 3.1e9, gamma0: 0.065, asymmetry: 0.18, fluxPeriod: 1.25, fluxOffset: 0.21 },
};
const BIAS = { biasMin: -1.2, biasMax: 1.2 };

interface DemoSweep {
  device: string;
  note: string;
  files: () => Array<{ name: string; text: string }>;
  options?: FitOptions;
  /** Review of the fit: who (role), what, why. */
  review?: { by: Role; decision: 'accept' | 'reject'; comment: string };
}

const DEMO_SWEEPS: DemoSweep[] = [
  {
    device: 'Q4-R1', note: 'Demo data (synthetic): resonance picked by the VNA marker, 120 bias points.',
    files: () => [{ name: 'Q4-R1_tuning_demo.csv', text: tuningPointsCsv(DEMO_TRUTH['Q4-R1'], { ...BIAS, points: 120, noiseHz: 1.2e5, seed: 11 }) }],
    review: { by: 'lab_lead', decision: 'accept', comment: 'Two full lobes, residuals flat; top of the curve within 0.1 % of the design frequency.' },
  },
  {
    device: 'Q4-R1', note: 'Demo data (synthetic): full S21 traces, 41 bias × 401 frequency points.',
    files: () => [{ name: 'Q4-R1_s21_demo.csv', text: rawComplexCsv(DEMO_TRUTH['Q4-R1'], { ...BIAS, points: 41, freqPoints: 401, noise: 0.003, seed: 12 }) }],
  },
  {
    device: 'Q4-R2', note: 'Demo data (synthetic): one Touchstone file per coil current, 21 files.',
    files: () => touchstoneSet(DEMO_TRUTH['Q4-R2'], { ...BIAS, points: 21, freqPoints: 301, noise: 0.003, seed: 13, prefix: 'Q4-R2' }),
    review: { by: 'device_engineer', decision: 'reject', comment: 'Only 21 bias points and the coil was still warming up during the first files; re-measure with a denser sweep.' },
  },
  {
    device: 'Q4-R2', note: 'Demo data (synthetic): denser re-measurement, 120 bias points.',
    files: () => [{ name: 'Q4-R2_tuning_demo.csv', text: tuningPointsCsv(DEMO_TRUTH['Q4-R2'], { ...BIAS, points: 120, noiseHz: 1.2e5, seed: 14 }) }],
    review: { by: 'device_engineer', decision: 'accept', comment: 'Dense sweep agrees with the Touchstone set within errors; accepting.' },
  },
  {
    device: 'Q4-R3', note: 'Demo data (synthetic): full S21 traces, 41 bias × 401 frequency points.',
    files: () => [{ name: 'Q4-R3_s21_demo.csv', text: rawComplexCsv(DEMO_TRUTH['Q4-R3'], { ...BIAS, points: 41, freqPoints: 401, noise: 0.003, seed: 15 }) }],
    review: { by: 'lab_lead', decision: 'accept', comment: 'All 41 traces extracted; Q_i flat with flux as expected.' },
  },
  {
    device: 'Q7-L1', note: 'Demo data (synthetic): reflected phase at 5.5 GHz versus coil current.',
    files: () => [{ name: 'Q7-L1_phase_demo.csv', text: phaseFluxCsv(DEMO_TRUTH['Q7-L1'], { biasMin: -1.5, biasMax: 1.5, points: 161, probeFrequencyHz: 5.5e9, noiseRad: 0.004, theta0Rad: 0.7, seed: 17 }) }],
    review: { by: 'lab_lead', decision: 'accept', comment: 'Phase swing as designed; L_eff modulation usable for the line experiments.' },
  },
  {
    device: 'Q8-R2', note: 'Demo data (synthetic): full S21 traces, 41 bias × 401 frequency points.',
    files: () => [{ name: 'Q8-R2_s21_demo.csv', text: rawComplexCsv(DEMO_TRUTH['Q8-R2'], { ...BIAS, points: 41, freqPoints: 401, noise: 0.003, seed: 18 }) }],
    review: { by: 'device_engineer', decision: 'accept', comment: 'Larger participation than NB-2611, as the longer oxidation predicts; Q_i a little lower.' },
  },
  {
    device: 'Q8-R4', note: 'Demo data (synthetic): resonance picked by the VNA marker, 120 bias points.',
    files: () => [{ name: 'Q8-R4_tuning_demo.csv', text: tuningPointsCsv(DEMO_TRUTH['Q8-R4'], { ...BIAS, points: 120, noiseHz: 1.5e5, seed: 19 }) }],
    review: { by: 'device_engineer', decision: 'accept', comment: 'Clean lobes; asymmetry at the top of the batch range.' },
  },
  {
    device: 'Q7-R5', note: 'Demo data (synthetic): resonance picked by the VNA marker, 120 bias points.',
    files: () => [{ name: 'Q7-R5_tuning_demo.csv', text: tuningPointsCsv(DEMO_TRUTH['Q7-R5'], { ...BIAS, points: 120, noiseHz: 1.5e5, seed: 16 }) }],
  },
];

const sha256 = (b: Uint8Array | string) => createHash('sha256').update(b).digest('hex');

async function seedOneSweep(em: EntityManager, labId: number, users: Map<Role, number>, s: DemoSweep, at: Date): Promise<void> {
  const device = await em.getRepository(DeviceEntity).findOneByOrFail({ labId, name: s.device });
  const cooldown = await em.getRepository(CooldownEntity).findOne({ where: { deviceId: device.id }, order: { startedOn: 'DESC' } });
  const files = s.files();
  const options: FitOptions = { model: 'exact', z0Ohm: device.designZ0Ohm ?? undefined, loopInductanceH: device.loopInductanceH ?? undefined, ...s.options };
  // Synchronous here (seeding is a one-off): parse and fit through the same pipeline the jobs use.
  const data = parseSweepFiles(files, coreOptions(options));
  const summary = summarise(data);
  const jobOptions: FitOptions = { ...options, kind: data.kind };
  const calibration: CalibrationJson = calibrateSweepData(data, coreOptions(jobOptions));
  const buffers = files.map((f) => Buffer.from(f.text, 'utf8'));
  const shas = buffers.map((b) => sha256(b));
  const setSha = files.length === 1 ? shas[0] : sha256(files.map((f, i) => `${f.name}:${shas[i]}`).sort().join('\n'));
  const engineer = users.get('device_engineer') ?? null;
  const sweep = await em.getRepository(SweepEntity).save({
    labId, deviceId: device.id, cooldownId: cooldown?.id ?? null, uploadedById: engineer, kind: data.kind,
    fileNames: files.map((f) => f.name), fileCount: files.length, byteSize: buffers.reduce((n, b) => n + b.length, 0),
    sha256: setSha, biasUnit: summary.biasUnit || null, parseSummary: summary, options: jobOptions, note: s.note, createdAt: at,
  });
  for (let i = 0; i < files.length; i++) {
    await em.getRepository(SweepFileEntity).insert({ sweepId: sweep.id, position: i, name: files[i].name, byteSize: buffers[i].length, sha256: shas[i], content: buffers[i] });
  }
  const fit = await insertFit(em, { labId, deviceId: device.id, sweepId: sweep.id, options: jobOptions, calibration, createdById: engineer });
  await em.getRepository(JobEntity).insert({
    labId, type: 'fit_upload', status: 'succeeded', progress: 1, message: `fit v${fit.version} proposed (demo seed)`, sweepId: sweep.id,
    fitId: fit.id, options: jobOptions, sourceFitId: null, attempts: 1, createdById: engineer, startedAt: at, finishedAt: at,
  });
  if (s.review) {
    const reviewedAt = new Date(at.getTime() + 3600_000);
    if (s.review.decision === 'accept') {
      await em.getRepository(FitEntity).update({ deviceId: device.id, status: 'accepted' }, { status: 'superseded', supersededByFitId: fit.id, supersededAt: reviewedAt });
    }
    await em.getRepository(FitEntity).update(
      { id: fit.id },
      { status: s.review.decision === 'accept' ? 'accepted' : 'rejected', reviewedById: users.get(s.review.by) ?? null, reviewedAt, reviewComment: s.review.comment },
    );
  }
}

/** Demo sweeps and fits for the demo lab, once (skipped when the lab already has sweeps). */
export async function seedDemoCalibrations(ds: DataSource): Promise<{ created: boolean }> {
  return ds.transaction(async (em) => {
    const [lab] = (await em.query('SELECT `id` FROM `lab` WHERE `name` = ? FOR UPDATE', [DEMO_LAB_NAME])) as Array<{ id: number }>;
    if (!lab) return { created: false };
    if (await em.getRepository(SweepEntity).exists({ where: { labId: lab.id } })) return { created: false };
    const members = await em.getRepository(UserEntity).findBy({ labId: lab.id });
    const users = new Map<Role, number>();
    for (const u of DEMO_USERS) {
      const row = members.find((m) => m.email === u.email);
      if (row) users.set(u.role, row.id);
    }
    // Spread over the weeks after each cooldown so lists have a plausible order.
    const start = Date.parse('2026-06-10T09:00:00Z');
    for (let i = 0; i < DEMO_SWEEPS.length; i++) await seedOneSweep(em, lab.id, users, DEMO_SWEEPS[i], new Date(start + i * 86_400_000));
    await recordAudit(em, { labId: lab.id, actorId: null, action: 'demo.seed_calibrations', subjectType: 'lab', subjectId: lab.id, details: { sweeps: DEMO_SWEEPS.length } });
    return { created: true };
  });
}

if (require.main === module) {
  void (async () => {
    const { loadConfig } = await import('../config');
    const { createDataSource } = await import('./dataSource');
    const cfg = loadConfig();
    const ds = createDataSource(cfg.db);
    await ds.initialize();
    await ds.runMigrations({ transaction: 'each' });
    const r = await seedDemo(ds, { bcryptCost: cfg.bcryptCost });
    console.log(r.created ? `seeded ${DEMO_LAB_NAME}` : `${DEMO_LAB_NAME} exists: nothing to seed`);
    await ds.destroy();
  })().catch((e) => {
    console.error(e);
    process.exit(1);
  });
}
