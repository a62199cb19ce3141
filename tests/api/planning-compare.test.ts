// Batch comparison over HTTP: per-batch statistics of the accepted calibrations checked against
// mathjs (an independent implementation: mean, std with the n − 1 divisor, median, mad), robust
// z-scores per Iglewicz & Hoaglin (1993) "How to Detect and Handle Outliers" (M = 0.6745·(x − x̃)/MAD,
// outlier when |M| > 3.5), spec-window flags, the CSV export parsing back to the same numbers, and
// spec windows (lab lead only, audited).
import Papa from 'papaparse';
import { mad as mMad, mean as mMean, median as mMedian, std as mStd } from 'mathjs';
import request from 'supertest';
import type { BatchCompareResponse, CompareDeviceValue } from '@/shared/api/planning';
import { bearer, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';
import { closeServer, files, TRUTH, uploadAndFit } from '../support/calibration';

let ts: TestServer;
let exp: string;
let lead: string;
let eng: string;
let batchId = 0;

// Six invented devices of one batch (γ0 a few %, common practice); the sixth has a far larger γ0.
const GAMMAS = [0.039, 0.04, 0.041, 0.0405, 0.0395, 0.07];

beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  [exp, lead, eng] = await Promise.all([signInAs(ts.app, 'experimentalist'), signInAs(ts.app, 'lab_lead'), signInAs(ts.app, 'device_engineer')]);
  const b = await request(ts.app).post('/api/batches').set(bearer(eng)).send({ code: 'CMP-1', wafer: 'test wafer' });
  expect(b.status).toBe(201);
  batchId = b.body.batch.id;
  for (let i = 0; i < GAMMAS.length; i++) {
    const d = await request(ts.app).post('/api/devices').set(bearer(eng)).send({ name: `CMP-${i + 1}`, batchId, geometry: 'quarter_wave', designZ0Ohm: 50 });
    expect(d.status).toBe(201);
    const { fit } = await uploadAndFit(ts.app, eng, d.body.device.id, files.tuning(100 + i, { ...TRUTH, gamma0: GAMMAS[i], f0Hz: 6.2e9 + i * 1e6 }, 80));
    expect((await request(ts.app).post(`/api/fits/${fit.id}/review`).set(bearer(eng)).send({ decision: 'accept' })).status).toBe(200);
  }
  // One device of the batch without an accepted calibration: counted in deviceCount only.
  expect((await request(ts.app).post('/api/devices').set(bearer(eng)).send({ name: 'CMP-raw', batchId, geometry: 'quarter_wave' })).status).toBe(201);
}, 240_000);
afterAll(() => closeServer(ts));

const compare = (token: string, q: string) => request(ts.app).get(`/api/batches/compare${q}`).set(bearer(token));

describe('statistics', () => {
  it('mean, sample std, median, MAD, min, max per parameter equal mathjs on the listed values', async () => {
    const r = await compare(exp, `?batches=${batchId}&params=gamma0,f0_hz,asymmetry,flux_period,qi`);
    expect(r.status).toBe(200);
    const body: BatchCompareResponse = r.body;
    expect(body.params).toEqual(['gamma0', 'f0_hz', 'asymmetry', 'flux_period', 'qi']);
    expect(body.units).toMatchObject({ f0_hz: 'Hz', gamma0: '1', flux_period: 'mA' });
    const [b] = body.batches;
    expect(b).toMatchObject({ id: batchId, code: 'CMP-1', count: 6, deviceCount: 7 });
    for (const p of ['gamma0', 'f0_hz', 'asymmetry', 'flux_period']) {
      const s = b.stats[p];
      const xs = s.devices.map((d) => d.value);
      expect(xs).toHaveLength(6);
      expect(s.count).toBe(6);
      expect(s.mean).toBeCloseTo(mMean(xs) as number, 12);
      expect(s.std! / (mStd(xs, 'unbiased') as unknown as number)).toBeCloseTo(1, 12);
      expect(s.median).toBe(mMedian(xs));
      expect(s.mad! / mMad(xs)).toBeCloseTo(1, 12);
      expect(s.min).toBe(Math.min(...xs));
      expect(s.max).toBe(Math.max(...xs));
      for (const d of s.devices) {
        const z = (0.6745 * (d.value - (mMedian(xs) as number))) / mMad(xs);
        expect(d.robustZ).toBeCloseTo(z, 10);
        expect(d.outlier).toBe(Math.abs(z) > 3.5);
      }
    }
    // Fitted γ0 close to the synthetic truth of each device (noise 150 kHz on ~80 points).
    const g = b.stats.gamma0.devices;
    GAMMAS.forEach((gt, i) => expect(Math.abs(g.find((d) => d.deviceName === `CMP-${i + 1}`)!.value / gt - 1)).toBeLessThan(0.05));
    // Tuning-points fits have no traces, so no Q_i: nothing to compare.
    expect(b.stats.qi).toMatchObject({ count: 0, mean: null, std: null, median: null, devices: [] });
  });

  it('the far γ0 is the one outlier (|M| > 3.5); the others are not', async () => {
    const b = (await compare(exp, `?batches=${batchId}&params=gamma0`)).body.batches[0];
    const flagged = b.stats.gamma0.devices.filter((d: CompareDeviceValue) => d.outlier).map((d: CompareDeviceValue) => d.deviceName);
    expect(flagged).toEqual(['CMP-6']);
  });

  it('hand check on the seeded batch NB-2611 (three devices): median is the middle value; MAD the middle deviation', async () => {
    const r = await compare(exp, '?params=gamma0');
    const nb = r.body.batches.find((x: { code: string }) => x.code === 'NB-2611');
    const xs: number[] = nb.stats.gamma0.devices.map((d: CompareDeviceValue) => d.value);
    const sorted = [...xs].sort((a, b) => a - b);
    expect(nb.stats.gamma0.median).toBe(sorted[1]);
    const dev = xs.map((x) => Math.abs(x - sorted[1])).sort((a, b) => a - b);
    expect(nb.stats.gamma0.mad).toBe(dev[1]);
    const m = (xs[0] + xs[1] + xs[2]) / 3;
    const sd = Math.sqrt(((xs[0] - m) ** 2 + (xs[1] - m) ** 2 + (xs[2] - m) ** 2) / 2);
    expect(nb.stats.gamma0.std / sd).toBeCloseTo(1, 12);
    // Every batch of the lab by default, ordered by code.
    expect(r.body.batches.map((x: { code: string }) => x.code)).toEqual(['CMP-1', 'NB-2611', 'NB-2614']);
  });

  it('bad queries: an unknown parameter names the known ones; a batch of no one’s → 404', async () => {
    const u = await compare(exp, '?params=gamma_0');
    expect(u.status).toBe(400);
    expect(u.body.error.message).toContain('gamma0');
    expect((await compare(exp, '?batches=99999')).status).toBe(404);
    expect((await compare(exp, '?batches=1,x')).status).toBe(400);
    expect((await request(ts.app).get('/api/batches/compare')).status).toBe(401);
  });
});

describe('spec windows and CSV', () => {
  it('a lab lead sets a window (others 403, no token 401); inSpec follows the bounds; DELETE clears it; all audited', async () => {
    const put = (t: string | null, param: string, body: unknown) => {
      const q = request(ts.app).put(`/api/spec-windows/${param}`).send(body as object);
      return t ? q.set(bearer(t)) : q;
    };
    expect((await put(null, 'gamma0', { min: 0.035, max: 0.045 })).status).toBe(401);
    expect((await put(eng, 'gamma0', { min: 0.035, max: 0.045 })).status).toBe(403);
    expect((await put(exp, 'gamma0', { min: 0.035, max: 0.045 })).status).toBe(403);
    expect((await put(lead, 'gamma0', { min: 0.05, max: 0.01 })).status).toBe(400);
    const ok = await put(lead, 'gamma0', { min: 0.035, max: 0.045 });
    expect(ok.status).toBe(200);
    expect(ok.body.specWindow).toMatchObject({ param: 'gamma0', min: 0.035, max: 0.045 });
    const list = (await request(ts.app).get('/api/spec-windows').set(bearer(eng))).body.specWindows;
    expect(list.find((w: { param: string }) => w.param === 'gamma0')).toMatchObject({ min: 0.035, max: 0.045 });

    const b = (await compare(exp, `?batches=${batchId}&params=gamma0,f0_hz`)).body;
    expect(b.specWindows.gamma0).toEqual({ min: 0.035, max: 0.045 });
    for (const d of b.batches[0].stats.gamma0.devices as CompareDeviceValue[]) expect(d.inSpec).toBe(d.value >= 0.035 && d.value <= 0.045);
    expect(b.batches[0].stats.gamma0.devices.find((d: CompareDeviceValue) => d.deviceName === 'CMP-6').inSpec).toBe(false);
    expect(b.batches[0].stats.f0_hz.devices.every((d: CompareDeviceValue) => d.inSpec === null)).toBe(true);

    // One open bound.
    expect((await put(lead, 'f0_hz', { min: null, max: 6.2025e9 })).status).toBe(200);
    const f = (await compare(exp, `?batches=${batchId}&params=f0_hz`)).body.batches[0].stats.f0_hz.devices as CompareDeviceValue[];
    for (const d of f) expect(d.inSpec).toBe(d.value <= 6.2025e9);

    expect((await request(ts.app).delete('/api/spec-windows/f0_hz').set(bearer(exp))).status).toBe(403);
    expect((await request(ts.app).delete('/api/spec-windows/f0_hz').set(bearer(lead))).status).toBe(204);
    expect((await request(ts.app).delete('/api/spec-windows/f0_hz').set(bearer(lead))).status).toBe(404);
    const actions = (await ts.dataSource.query("SELECT action, subjectId FROM audit_event WHERE subjectType = 'spec_window' ORDER BY id")) as Array<{ action: string; subjectId: string }>;
    expect(actions.map((a) => `${a.action}:${a.subjectId}`)).toEqual(['spec_window.put:gamma0', 'spec_window.put:f0_hz', 'spec_window.delete:f0_hz']);
  });

  it('CSV: one row per device × parameter, parses back to the JSON numbers; the export is audited', async () => {
    const q = `?batches=${batchId}&params=gamma0,asymmetry`;
    const json: BatchCompareResponse = (await compare(exp, q)).body;
    const r = await request(ts.app).get(`/api/batches/compare.csv${q}`).set(bearer(exp));
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^text\/csv/);
    expect(r.headers['content-disposition']).toMatch(/^attachment; filename="?batch-compare_CMP-1\.csv/);
    const parsed = Papa.parse<Record<string, string>>(r.text.trim(), { header: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data).toHaveLength(12);
    for (const p of ['gamma0', 'asymmetry'] as const) {
      const s = json.batches[0].stats[p];
      for (const d of s.devices) {
        const row = parsed.data.find((x) => x.device === d.deviceName && x.parameter === p)!;
        expect(Number(row.value)).toBe(d.value);
        expect(Number(row.batch_median)).toBe(s.median);
        expect(Number(row.robust_z)).toBe(d.robustZ);
        expect(row.outlier).toBe(String(d.outlier));
        expect(row.in_spec).toBe(d.inSpec === null ? '' : String(d.inSpec));
        expect(Number(row.fit_version)).toBe(d.fitVersion);
      }
    }
    const n = await ts.dataSource.query("SELECT COUNT(*) AS n FROM audit_event WHERE action = 'batch_compare.export'");
    expect(Number(n[0].n)).toBe(1);
  });
});
