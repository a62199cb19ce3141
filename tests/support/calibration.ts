// Helpers for the calibration API tests: synthetic input files (calibration/synth.ts generates them
// from a known truth), multipart uploads and job polling.
import request from 'supertest';
import type { Express } from 'express';
import { phaseFluxCsv, rawComplexCsv, touchstoneSet, tuningPointsCsv, type SyntheticDevice } from '@/calibration/synth';
import type { JobRunner } from '@/server/jobs/runner';
import { bearer } from './api';
import type { TestServer } from './testServer';

/** Invented quarter-wave device in the usual range (f ≈ 6 GHz, γ0 a few %, d ≈ 0.1; common practice). */
export const TRUTH: SyntheticDevice = {
  f0Hz: 6.2e9, gamma0: 0.04, asymmetry: 0.1, fluxPeriod: 1.1, fluxOffset: 0.07, biasUnit: 'mA',
  geometry: 'notch', qi: 4e4, qcAbs: 1.5e4, phiRad: 0.15, a: 0.3, alphaRad: 1.1, delayS: 55e-9,
};

/** Invented long line for the phase-versus-flux model: τ_eff0 = γ0/(4 f0) = 5 ps. */
export const PHASE_TRUTH: SyntheticDevice = { ...TRUTH, f0Hz: 3e9, gamma0: 0.06, asymmetry: 0.2, fluxPeriod: 1.3, fluxOffset: 0.3, geometry: 'reflection' };
export const PHASE_PROBE_HZ = 6e9;
export const PHASE_THETA0 = 1.0;

export interface UploadFile {
  name: string;
  text: string;
}

export const files = {
  tuning(seed = 1, dev: SyntheticDevice = TRUTH, points = 200): UploadFile[] {
    return [{ name: 'tuning.csv', text: tuningPointsCsv(dev, { biasMin: -1.2, biasMax: 1.2, points, noiseHz: 1.5e5, seed }) }];
  },
  raw(seed = 2, dev: SyntheticDevice = TRUTH, points = 41, freqPoints = 401): UploadFile[] {
    return [{ name: 'raw.csv', text: rawComplexCsv(dev, { biasMin: -1.2, biasMax: 1.2, points, freqPoints, noise: 0.002, seed }) }];
  },
  touchstone(seed = 3, dev: SyntheticDevice = TRUTH, points = 25): UploadFile[] {
    return touchstoneSet(dev, { biasMin: -1.2, biasMax: 1.2, points, freqPoints: 301, noise: 0.002, seed, prefix: 'q4' });
  },
  phase(seed = 4, withProbe = true): UploadFile[] {
    let text = phaseFluxCsv(PHASE_TRUTH, { biasMin: -1.5, biasMax: 1.5, points: 200, probeFrequencyHz: PHASE_PROBE_HZ, noiseRad: 0.003, theta0Rad: PHASE_THETA0, seed });
    if (!withProbe) text = text.split('\n').filter((l) => !/probe_frequency/.test(l)).join('\n');
    return [{ name: 'phase.csv', text }];
  },
};

/** POST /api/devices/:id/sweeps as multipart; fields are sent as text parts. */
export function upload(app: Express, token: string, deviceId: number, fs: UploadFile[], fields: Record<string, string | number | boolean> = {}) {
  let req = request(app).post(`/api/devices/${deviceId}/sweeps`).set(bearer(token));
  for (const [k, v] of Object.entries(fields)) req = req.field(k, String(v));
  for (const f of fs) req = req.attach('files', Buffer.from(f.text, 'utf8'), { filename: f.name, contentType: 'text/plain' });
  return req;
}

/** Poll GET /api/jobs/:id until it has finished. */
export async function waitForJob(app: Express, token: string, jobId: number, timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const r = await request(app).get(`/api/jobs/${jobId}`).set(bearer(token));
    if (r.status !== 200) throw new Error(`GET /api/jobs/${jobId}: ${r.status} ${JSON.stringify(r.body)}`);
    if (r.body.job.status === 'succeeded' || r.body.job.status === 'failed') return r.body as { job: { status: string; fitId: number | null; message: string; progress: number; attempts: number }; fit?: { id: number; version: number } };
    if (Date.now() > until) throw new Error(`job ${jobId} still ${r.body.job.status} after ${timeoutMs} ms`);
    await new Promise((res) => setTimeout(res, 100));
  }
}

/** Upload and wait for the proposed fit; returns the fit JSON (metadata). */
export async function uploadAndFit(app: Express, token: string, deviceId: number, fs: UploadFile[], fields: Record<string, string | number | boolean> = {}) {
  const r = await upload(app, token, deviceId, fs, fields);
  if (r.status !== 201 && r.status !== 202) throw new Error(`upload: ${r.status} ${JSON.stringify(r.body)}`);
  const done = r.status === 201 ? r.body : await waitForJob(app, token, r.body.job.id);
  if (!done.fit) throw new Error(`fit job failed: ${JSON.stringify(done.job)}`);
  return { upload: r, fit: done.fit as { id: number; version: number; status: string; deviceId: number; sweepId: number } };
}

export function jobsOf(ts: TestServer): JobRunner {
  return ts.app.locals.jobs as JobRunner;
}

/** Stop the worker pool, then the server. */
export async function closeServer(ts: TestServer | undefined): Promise<void> {
  if (!ts) return;
  await jobsOf(ts).close();
  await ts.close();
}

export async function tableCounts(ts: TestServer): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of ['sweep', 'sweep_file', 'fit', 'job', 'audit_event']) {
    const [row] = await ts.dataSource.query(`SELECT COUNT(*) AS n FROM \`${t}\``);
    out[t] = Number(row.n);
  }
  return out;
}

export async function deviceIdByName(app: Express, token: string, name: string): Promise<number> {
  const r = await request(app).get('/api/devices').set(bearer(token));
  const d = (r.body.devices as Array<{ id: number; name: string }>).find((x) => x.name === name);
  if (!d) throw new Error(`no device ${name}`);
  return d.id;
}

/** A fresh device in batch 1 (tests that need a device without the demo fits). */
export async function newDevice(app: Express, token: string, name: string, geometry: 'quarter_wave' | 'phase_only' = 'quarter_wave'): Promise<number> {
  const b = await request(app).get('/api/batches').set(bearer(token));
  const r = await request(app).post('/api/devices').set(bearer(token)).send({ name, batchId: b.body.batches[0].id, geometry, designZ0Ohm: 50 });
  if (r.status !== 201) throw new Error(`create device: ${r.status} ${JSON.stringify(r.body)}`);
  return r.body.device.id;
}
