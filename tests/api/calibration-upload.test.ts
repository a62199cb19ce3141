// Sweep upload → parse (worker) → job → proposed fit, for each input kind; refusals store nothing.
// Inputs come from calibration/synth.ts with a known truth; recovery targets are the issue's
// (f0 1e-4 relative, γ0 1 %, d ±0.01, |period| 1e-3 relative, offset 2e-3 of a period; phase:
// τ_eff0 1 %, d ±0.01, period 2e-3, offset 2e-3 of a period) — the same targets the core's unit
// tests hold against scipy-generated fixtures.
// Status codes: RFC 9110 §15.3.2 (201 Created), §15.3.3 (202 Accepted), §15.5.14 (413 Content Too
// Large), §15.5.21 (422 Unprocessable Content).
import { createHash } from 'node:crypto';
import request from 'supertest';
import { bearer, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';
import {
  closeServer, files, newDevice, PHASE_PROBE_HZ, PHASE_TRUTH, tableCounts, TRUTH, upload, uploadAndFit, waitForJob,
} from '../support/calibration';

let ts: TestServer;
let eng: string;
let lead: string;
let exp: string;

beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  [eng, lead, exp] = await Promise.all([signInAs(ts.app, 'device_engineer'), signInAs(ts.app, 'lab_lead'), signInAs(ts.app, 'experimentalist')]);
});
afterAll(() => closeServer(ts));

type Params = Record<string, { value: number; stderr: number | null }>;
async function calibrationOf(fitId: number) {
  const r = await request(ts.app).get(`/api/fits/${fitId}`).set(bearer(exp));
  expect(r.status).toBe(200);
  return r.body.fit.calibration as { params: Params; kind: string; model: string; traces?: unknown[]; points: unknown[]; bias_unit: string };
}

function expectTuningTruth(p: Params) {
  expect(Math.abs(p.f0_hz.value / TRUTH.f0Hz - 1)).toBeLessThan(1e-4);
  expect(Math.abs(p.gamma0.value / TRUTH.gamma0 - 1)).toBeLessThan(0.01);
  expect(Math.abs(p.asymmetry.value - TRUTH.asymmetry)).toBeLessThan(0.01);
  expect(Math.abs(Math.abs(p.flux_period.value) / TRUTH.fluxPeriod - 1)).toBeLessThan(1e-3);
  expect(Math.abs(p.flux_offset.value - TRUTH.fluxOffset) / TRUTH.fluxPeriod).toBeLessThan(2e-3);
}

describe('each input kind gives a proposed fit that recovers the synthetic truth', () => {
  const cases = [
    ['tuning points', () => files.tuning(), 'tuning_points', 200],
    ['raw complex (41 bias × 401 frequencies)', () => files.raw(), 'raw_complex', 41],
    ['Touchstone set (25 files)', () => files.touchstone(), 'touchstone', 25],
  ] as const;
  it.each(cases)('%s', async (_label, make, kind, n) => {
    const deviceId = await newDevice(ts.app, eng, `UP-${kind}`);
    const fs = make();
    const { upload: r, fit } = await uploadAndFit(ts.app, eng, deviceId, fs, { note: 'synthetic test sweep' });
    expect([201, 202]).toContain(r.status);
    expect(r.body.sweep).toMatchObject({ deviceId, kind, fileNames: fs.map((f) => f.name), note: 'synthetic test sweep', biasUnit: 'mA' });
    expect(r.body.sweep.parseSummary).toMatchObject({ kind, points: n, biasUnit: 'mA' });
    expect(r.body.sweep.files).toHaveLength(fs.length);
    expect(r.body.sweep.byteSize).toBe(fs.reduce((s, f) => s + Buffer.byteLength(f.text), 0));
    expect(fit).toMatchObject({ status: 'proposed', version: 1, deviceId, kind, model: 'exact' });
    const cal = await calibrationOf(fit.id);
    expect(cal.kind).toBe(kind);
    expectTuningTruth(cal.params);
    if (kind !== 'tuning_points') expect(cal.traces).toHaveLength(n);
    // The device now has a fit waiting for review.
    const dev = await request(ts.app).get(`/api/devices/${deviceId}`).set(bearer(exp));
    expect(dev.body.device).toMatchObject({ calibrationStatus: 'proposed', activeCalibration: null });
  });

  it('phase versus flux (phase-only line): τ_eff0 = γ0/(4 f0), d, period and offset recovered', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-phase', 'phase_only');
    const { fit } = await uploadAndFit(ts.app, eng, deviceId, files.phase());
    const cal = await calibrationOf(fit.id);
    expect(cal.model).toBe('phase');
    const p = cal.params;
    // τ_eff = γ/(4 f0): Johansson et al., PRA 82, 052509 (2010), as implemented in squid/model.ts.
    const tau = PHASE_TRUTH.gamma0 / (4 * PHASE_TRUTH.f0Hz);
    expect(Math.abs(p.tau_eff0_s.value / tau - 1)).toBeLessThan(0.01);
    expect(Math.abs(p.asymmetry.value - PHASE_TRUTH.asymmetry)).toBeLessThan(0.01);
    expect(Math.abs(Math.abs(p.flux_period.value) / PHASE_TRUTH.fluxPeriod - 1)).toBeLessThan(2e-3);
    expect(Math.abs(p.flux_offset.value - PHASE_TRUTH.fluxOffset) / PHASE_TRUTH.fluxPeriod).toBeLessThan(2e-3);
  });

  it('a phase sweep without a stated probe frequency needs probeFrequencyHz (400 naming the field), then fits with it', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-phase-noprobe', 'phase_only');
    const before = await tableCounts(ts);
    const r = await upload(ts.app, eng, deviceId, files.phase(5, false), { kind: 'phase_flux' });
    expect(r.status).toBe(400);
    expect(r.body.error.details).toEqual([{ path: 'probeFrequencyHz', message: expect.stringContaining('probe frequency') }]);
    const after = await tableCounts(ts);
    expect({ ...after, audit_event: 0 }).toEqual({ ...before, audit_event: 0 });
    const { fit } = await uploadAndFit(ts.app, eng, deviceId, files.phase(5, false), { kind: 'phase_flux', probeFrequencyHz: PHASE_PROBE_HZ });
    expect((await calibrationOf(fit.id)).params.tau_eff0_s.value).toBeGreaterThan(0);
  });
});

describe('refusals', () => {
  it('a file with a bad cell → 422 SWEEP_INVALID naming file, row and column; only an audit event is stored', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-bad');
    const good = files.tuning(11)[0].text.split('\n');
    // Line 1 is a comment, line 2 the header: line 8 is the 6th data row. Break its frequency cell.
    const parts = good[7].split(',');
    parts[1] = 'n/a';
    good[7] = parts.join(',');
    const before = await tableCounts(ts);
    const r = await upload(ts.app, eng, deviceId, [{ name: 'broken.csv', text: good.join('\n') }]);
    expect(r.status).toBe(422);
    expect(r.body.error.code).toBe('SWEEP_INVALID');
    expect(r.body.error.message).toContain('broken.csv: row 8');
    expect(r.body.error.details.issues).toEqual([
      expect.objectContaining({ file: 'broken.csv', row: 8, column: 'frequency [GHz]', message: expect.stringContaining("'n/a'") }),
    ]);
    const after = await tableCounts(ts);
    expect(after).toEqual({ ...before, audit_event: before.audit_event + 1 });
    const [ev] = await ts.dataSource.query("SELECT action, details FROM audit_event ORDER BY id DESC LIMIT 1");
    expect(ev.action).toBe('sweep.rejected');
  });

  it('no file → 400 naming the field "files"; JSON body instead of multipart → 400', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-nofile');
    const r = await upload(ts.app, eng, deviceId, [], { note: 'x' });
    expect(r.status).toBe(400);
    expect(r.body.error.details[0].path).toBe('files');
    const j = await request(ts.app).post(`/api/devices/${deviceId}/sweeps`).set(bearer(eng)).send({ files: 'x' });
    expect(j.status).toBe(400);
  });

  it('bad options → 400 with the field named; unknown device → 404; cooldown of another device → 400', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-opts');
    const r = await upload(ts.app, eng, deviceId, files.tuning(), { model: 'cubic', z0Ohm: '-3' });
    expect(r.status).toBe(400);
    expect(r.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['model', 'z0Ohm']);
    expect((await upload(ts.app, eng, 999999, files.tuning())).status).toBe(404);
    const c = await upload(ts.app, eng, deviceId, files.tuning(), { cooldownId: 1 });
    expect(c.status).toBe(400);
    expect(c.body.error.details[0].path).toBe('cooldownId');
  });

  it('experimentalists may not upload (403) and nothing is stored', async () => {
    const deviceId = await newDevice(ts.app, lead, 'UP-403');
    const before = await tableCounts(ts);
    const r = await upload(ts.app, exp, deviceId, files.tuning());
    expect(r.status).toBe(403);
    expect(await tableCounts(ts)).toEqual(before);
  });
});

describe('jobs', () => {
  it('GET /api/jobs/:id reports progress to 1 and links the fit; the upload and the fit are audited', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-job');
    const r = await upload(ts.app, eng, deviceId, files.raw(21));
    expect([201, 202]).toContain(r.status);
    const done = await waitForJob(ts.app, exp, r.body.job.id);
    expect(done.job).toMatchObject({ status: 'succeeded', progress: 1, attempts: 1 });
    expect(done.fit).toMatchObject({ id: done.job.fitId, version: 1 });
    const actions = (await ts.dataSource.query('SELECT action, subjectId FROM audit_event ORDER BY id')) as Array<{ action: string; subjectId: string }>;
    expect(actions).toEqual(expect.arrayContaining([
      { action: 'sweep.upload', subjectId: String(r.body.sweep.id) },
      { action: 'fit.create', subjectId: String(done.job.fitId) },
    ]));
    expect((await request(ts.app).get('/api/jobs/999999').set(bearer(exp))).status).toBe(404);
  });

  it('a sweep in which no trace shows a resonance fails its job with the core message; no fit is stored', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-fail');
    // Flat transmission (no dip anywhere): parses fine, but every trace is flagged by the extraction.
    const rows = ['bias [mA],frequency [Hz],S21 real,S21 imag'];
    for (let b = 0; b < 6; b++) for (let i = 0; i < 60; i++) rows.push(`${b * 0.1},${6e9 + i * 1e5},${(0.5 + 1e-4 * Math.sin(7 * i + b)).toFixed(6)},0.000100`);
    const before = await tableCounts(ts);
    const r = await upload(ts.app, eng, deviceId, [{ name: 'flat.csv', text: rows.join('\n') }]);
    expect([201, 202]).toContain(r.status);
    const done = await waitForJob(ts.app, eng, r.body.job.id);
    expect(done.job.status).toBe('failed');
    expect(done.job.message).toMatch(/flat\.csv: no trace gave a usable resonance/);
    const after = await tableCounts(ts);
    expect(after.fit).toBe(before.fit);
    expect(after.sweep).toBe(before.sweep + 1);
    const [ev] = await ts.dataSource.query("SELECT action FROM audit_event WHERE subjectType = 'job' AND subjectId = ?", [String(r.body.job.id)]);
    expect(ev.action).toBe('fit.failed');
  });
});

describe('large files', () => {
  it('a ~20 MB raw sweep (above MariaDB\'s 16 MB default packet) is stored byte for byte and fitted', async () => {
    const deviceId = await newDevice(ts.app, eng, 'UP-20MB');
    const big = files.raw(31, TRUTH, 241, 2001);
    const bytes = Buffer.byteLength(big[0].text);
    expect(bytes).toBeGreaterThan(19e6);
    const { upload: r, fit } = await uploadAndFit(ts.app, eng, deviceId, big);
    // The database's own SHA2 of the stored blob equals the hash of what was sent (FIPS 180-4 SHA-256).
    const [row] = await ts.dataSource.query('SELECT byteSize, sha256, SHA2(content, 256) AS dbSha FROM sweep_file WHERE sweepId = ?', [r.body.sweep.id]);
    const sent = createHash('sha256').update(big[0].text).digest('hex');
    expect({ size: row.byteSize, sha: row.sha256, dbSha: row.dbSha }).toEqual({ size: bytes, sha: sent, dbSha: sent });
    expect(r.body.sweep.sha256).toBe(sent);
    expectTuningTruth((await calibrationOf(fit.id)).params);
  });
});

describe('upload limit', () => {
  let small: TestServer;
  beforeAll(async () => {
    small = await startTestServer({ seedDemo: true, config: { uploadLimitMb: 1 } });
  });
  afterAll(() => closeServer(small));

  it('a file above FW_UPLOAD_LIMIT_MB → 413 naming the limit, nothing stored', async () => {
    const token = await signInAs(small.app, 'device_engineer');
    const d = await request(small.app).get('/api/devices').set(bearer(token));
    const deviceId = d.body.devices[0].id;
    const before = await tableCounts(small);
    const big = files.raw(9, TRUTH, 41, 1001); // ≈ 1.9 MB
    expect(Buffer.byteLength(big[0].text)).toBeGreaterThan(1024 * 1024);
    const r = await upload(small.app, token, deviceId, big);
    expect(r.status).toBe(413);
    expect(r.body.error).toEqual({ code: 'PAYLOAD_TOO_LARGE', message: expect.stringContaining('1 MB') });
    expect(await tableCounts(small)).toEqual(before);
  });
});
