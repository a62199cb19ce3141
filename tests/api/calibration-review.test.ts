// Review (accept/reject, concurrent accepts), refit versions, immutability, compare, the device's
// calibration JSON for the planner, export, e-mail and audit.
// Status codes: RFC 9110 §15.5.10 (409 Conflict: the fit's current state forbids the review).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Papa from 'papaparse';
import { createConnection } from 'mysql2/promise';
import { runFit } from '@/calibration/cli/fit';
import request from 'supertest';
import { planFromCalibration } from '@/calibration/planner';
import { FIT_ID_HEADER, FIT_VERSION_HEADER } from '@/shared/api/calibration';
import { bearer, demoUser, signInAs } from '../support/api';
import { TEST_DB } from '../support/ensureTestDb';
import { startTestServer, type TestServer } from '../support/testServer';
import { closeServer, files, newDevice, TRUTH, uploadAndFit, waitForJob } from '../support/calibration';

let ts: TestServer;
let eng: string;
let lead: string;
let exp: string;
let n = 0;

beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  [eng, lead, exp] = await Promise.all([signInAs(ts.app, 'device_engineer'), signInAs(ts.app, 'lab_lead'), signInAs(ts.app, 'experimentalist')]);
});
afterAll(() => closeServer(ts));

const review = (token: string, fitId: number, decision: 'accept' | 'reject', comment?: string) =>
  request(ts.app).post(`/api/fits/${fitId}/review`).set(bearer(token)).send({ decision, comment });
const getFit = async (id: number) => (await request(ts.app).get(`/api/fits/${id}`).set(bearer(exp))).body.fit;
const acceptedCount = async (deviceId: number) =>
  Number((await ts.dataSource.query("SELECT COUNT(*) AS n FROM fit WHERE deviceId = ? AND status = 'accepted'", [deviceId]))[0].n);

async function deviceWithFits(count: number, seed = 1) {
  const deviceId = await newDevice(ts.app, eng, `RV-${++n}`);
  const ids: number[] = [];
  for (let i = 0; i < count; i++) ids.push((await uploadAndFit(ts.app, eng, deviceId, files.tuning(seed + i, TRUTH, 120))).fit.id);
  return { deviceId, ids };
}

describe('accepting a fit', () => {
  it('two reviewers accept two proposed fits at the same moment: exactly one ends accepted, the other superseded by it', async () => {
    for (let round = 0; round < 3; round++) {
      const { deviceId, ids } = await deviceWithFits(2, 10 * round + 1);
      const [ra, rb] = await Promise.all([review(eng, ids[0], 'accept', 'looks right'), review(lead, ids[1], 'accept', 'agreed')]);
      // Both requests reviewed a fit that was proposed when they arrived; the device lock orders them.
      expect([ra.status, rb.status]).toEqual([200, 200]);
      expect(await acceptedCount(deviceId)).toBe(1);
      const [fa, fb] = [await getFit(ids[0]), await getFit(ids[1])];
      const winner = fa.status === 'accepted' ? fa : fb;
      const loser = winner === fa ? fb : fa;
      expect(loser).toMatchObject({ status: 'superseded', supersededByFitId: winner.id, supersededAt: expect.any(String) });
      // The superseded fit keeps the review that accepted it.
      expect(loser.reviewedBy).not.toBeNull();
      const dev = (await request(ts.app).get(`/api/devices/${deviceId}`).set(bearer(exp))).body.device;
      expect(dev).toMatchObject({ calibrationStatus: 'accepted', activeCalibration: { fitId: winner.id, version: winner.version } });
      const cal = await request(ts.app).get(`/api/devices/${deviceId}/calibration`).set(bearer(exp));
      expect(cal.headers[FIT_ID_HEADER.toLowerCase()]).toBe(String(winner.id));
    }
  });

  it('the same fit accepted twice at once: one 200, one 409; a rejected fit cannot be reviewed again', async () => {
    const { deviceId, ids } = await deviceWithFits(1, 40);
    const rs = await Promise.all([review(eng, ids[0], 'accept'), review(lead, ids[0], 'accept')]);
    expect(rs.map((r) => r.status).sort()).toEqual([200, 409]);
    expect(rs.find((r) => r.status === 409)!.body.error).toMatchObject({ code: 'CONFLICT', message: expect.stringContaining('only a proposed fit can be reviewed') });
    expect(await acceptedCount(deviceId)).toBe(1);

    const { ids: [other] } = await deviceWithFits(1, 41);
    const rj = await review(lead, other, 'reject', 'offset drifts between lobes; re-measure');
    expect(rj.status).toBe(200);
    expect(rj.body.fit).toMatchObject({ status: 'rejected', reviewComment: 'offset drifts between lobes; re-measure', reviewedBy: { name: demoUser('lab_lead').name } });
    expect((await review(eng, other, 'accept')).status).toBe(409);
  });

  it('experimentalists may not review (403); a body without a decision → 400', async () => {
    const { ids } = await deviceWithFits(1, 50);
    const r = await review(exp, ids[0], 'accept');
    expect(r.status).toBe(403);
    expect((await getFit(ids[0])).status).toBe('proposed');
    const bad = await request(ts.app).post(`/api/fits/${ids[0]}/review`).set(bearer(eng)).send({ decision: 'maybe' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0].path).toBe('decision');
  });

  it('e-mail: a new fit reaches the device engineers; an accepted calibration reaches the experimentalists with plans on the device', async () => {
    const { deviceId, ids } = await deviceWithFits(2, 60);
    const dev = (await request(ts.app).get(`/api/devices/${deviceId}`).set(bearer(exp))).body.device;
    const proposed = await ts.mailbox.waitFor((m) => m.subject === `${dev.name}: fit v1 waits for review`);
    expect(proposed.to).toContain(demoUser('device_engineer').email);
    expect(proposed.text).toContain(`/devices/${deviceId}`);
    expect(proposed.text).toMatch(/f0 = 6\.2\d* ± [\d.]+ GHz/);
    // v1 accepted while nobody has plans on the device: no one to tell.
    await review(lead, ids[0], 'accept', 'first calibration');
    // An experimentalist plans on v1; another active experimentalist (inserted directly) has no plans here.
    await ts.dataSource.query(
      "INSERT INTO `user` (labId, email, name, passwordHash, role, active) SELECT labId, 'exp-noplans@demo.fluxwright.test', 'No Plans', 'x', 'experimentalist', 1 FROM `user` WHERE email = ?",
      [demoUser('experimentalist').email],
    );
    const plan = await request(ts.app).post('/api/plans').set(bearer(exp)).send({ deviceId, request: { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, uncertaintyDraws: 0 } });
    expect(plan.status).toBe(201);
    await review(lead, ids[1], 'accept', 'good fit');
    const accepted = await ts.mailbox.waitFor((m) => m.subject === `${dev.name}: calibration v2 accepted`);
    expect(accepted.to).toContain(demoUser('experimentalist').email);
    expect(accepted.to).not.toContain('exp-noplans@demo.fluxwright.test');
    expect(accepted.text).toContain('good fit');
    const all = await ts.mailbox.messages();
    expect(all.filter((m) => m.subject === `${dev.name}: calibration v1 accepted`)).toEqual([]);
    // Lab leads are not on either list.
    expect(all.filter((m) => m.subject.startsWith(dev.name) && m.to.includes(demoUser('lab_lead').email))).toEqual([]);
  });

  it('reviews are audited with the decision and what was superseded', async () => {
    const { ids } = await deviceWithFits(2, 70);
    await review(eng, ids[0], 'accept');
    await review(eng, ids[1], 'accept');
    const rows = (await ts.dataSource.query("SELECT action, details FROM audit_event WHERE subjectType = 'fit' AND subjectId = ?", [String(ids[1])])) as Array<{ action: string; details: string | object }>;
    const ev = rows.find((r) => r.action === 'fit.accept');
    const details = typeof ev!.details === 'string' ? JSON.parse(ev!.details) : ev!.details;
    expect(details.superseded).toEqual([ids[0]]);
  });
});

describe('the device calibration JSON', () => {
  it('404 NO_ACTIVE_CALIBRATION naming the device until a fit is accepted', async () => {
    const { deviceId } = await deviceWithFits(1, 80);
    const name = (await request(ts.app).get(`/api/devices/${deviceId}`).set(bearer(exp))).body.device.name;
    const r = await request(ts.app).get(`/api/devices/${deviceId}/calibration`).set(bearer(exp));
    expect(r.status).toBe(404);
    expect(r.body).toEqual({ error: { code: 'NO_ACTIVE_CALIBRATION', message: `device ${name} has no accepted calibration yet` } });
    expect((await request(ts.app).get('/api/devices/999999/calibration').set(bearer(exp))).body.error.code).toBe('NOT_FOUND');
  });

  it('is the stored calibration JSON exactly, id and version in headers, and the planner reads it', async () => {
    const deviceId = await newDevice(ts.app, eng, `RV-plan-${++n}`);
    const { fit } = await uploadAndFit(ts.app, eng, deviceId, files.raw(81));
    await review(lead, fit.id, 'accept');
    const r = await request(ts.app).get(`/api/devices/${deviceId}/calibration`).set(bearer(exp));
    expect(r.status).toBe(200);
    expect(r.headers[FIT_ID_HEADER.toLowerCase()]).toBe(String(fit.id));
    expect(r.headers[FIT_VERSION_HEADER.toLowerCase()]).toBe('1');
    expect(r.body).toEqual((await getFit(fit.id)).calibration);
    expect(r.body.schema).toBe('fluxwright.calibration/1');
    expect(r.body).not.toHaveProperty('fitId');
    // The planner consumes the served JSON as is.
    const plan = planFromCalibration(r.body, { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, uncertaintyDraws: 0 });
    for (const k of ['pump_frequency_hz', 'pump_amplitude_phi0', 'kappa_over_2pi_hz'] as const) {
      expect(Number.isFinite(plan[k] as number)).toBe(true);
    }
    // Resonance at 0.3 Φ0 is below f0 (the SQUID inductance lowers it) and the pump sits near 2 f_r.
    expect(plan.pump_frequency_hz).toBeGreaterThan(2 * 5e9);
    expect(plan.pump_frequency_hz).toBeLessThan(2 * TRUTH.f0Hz);
  });

  it('equals what the command line prints with `fit --json` for the same file and options', async () => {
    const deviceId = await newDevice(ts.app, eng, `RV-cli-${++n}`); // design Z0 = 50 Ω, no loop inductance
    const [file] = files.tuning(85, TRUTH, 90);
    const { fit } = await uploadAndFit(ts.app, eng, deviceId, [file]);
    await review(eng, fit.id, 'accept');
    const served = await request(ts.app).get(`/api/devices/${deviceId}/calibration`).set(bearer(exp));
    const dir = mkdtempSync(path.join(tmpdir(), 'fw-cli-'));
    writeFileSync(path.join(dir, file.name), file.text);
    const cli = runFit([path.join(dir, file.name), '--json', '--model', 'exact', '--z0', '50']);
    expect(cli.exitCode).toBe(0);
    expect(served.body).toEqual(JSON.parse(cli.stdout));
  });
});

describe('refit, versions and immutability', () => {
  it('refits of one sweep get versions 2, 3 (newest first in the list); the source fit never changes', async () => {
    const deviceId = await newDevice(ts.app, eng, `RV-refit-${++n}`);
    const { fit: v1 } = await uploadAndFit(ts.app, eng, deviceId, files.tuning(90));
    const before = await getFit(v1.id);
    const r2 = await request(ts.app).post(`/api/fits/${v1.id}/refit`).set(bearer(eng)).send({ model: 'approx' });
    expect([201, 202]).toContain(r2.status);
    const d2 = r2.status === 201 ? r2.body : await waitForJob(ts.app, eng, r2.body.job.id);
    expect(d2.fit).toMatchObject({ version: 2, model: 'approx', sweepId: v1.sweepId });
    const r3 = await request(ts.app).post(`/api/fits/${v1.id}/refit`).set(bearer(lead)).send({ symmetric: true, loss: 'linear', z0Ohm: 48 });
    const d3 = r3.status === 201 ? r3.body : await waitForJob(ts.app, eng, r3.body.job.id);
    expect(d3.fit).toMatchObject({ version: 3, model: 'exact', options: expect.objectContaining({ symmetric: true, loss: 'linear', z0Ohm: 48 }) });
    // A symmetric SQUID fit holds d at 0.
    expect(d3.fit.asymmetry.value).toBe(0);
    const list = await request(ts.app).get(`/api/devices/${deviceId}/fits`).set(bearer(exp));
    expect(list.body.fits.map((f: { version: number }) => f.version)).toEqual([3, 2, 1]);
    expect(await getFit(v1.id)).toEqual(before);
    const bad = await request(ts.app).post(`/api/fits/${v1.id}/refit`).set(bearer(eng)).send({ model: 'quadratic' });
    expect(bad.status).toBe(400);
    expect((await request(ts.app).post(`/api/fits/${v1.id}/refit`).set(bearer(exp)).send({})).status).toBe(403);
  });

  it('no route changes a fit, a review changes only review fields, and the database refuses edits of results', async () => {
    const { ids: [id] } = await deviceWithFits(1, 95);
    const before = await getFit(id);
    for (const m of ['put', 'patch', 'delete'] as const) {
      const r = await request(ts.app)[m](`/api/fits/${id}`).set(bearer(lead)).send({ calibration: {} });
      expect(r.status).toBe(404);
    }
    await review(eng, id, 'reject', 'noisy');
    const after = await getFit(id);
    const { status, reviewedBy, reviewedAt, reviewComment, ...rest } = after;
    const { status: s0, reviewedBy: r0, reviewedAt: a0, reviewComment: c0, ...rest0 } = before;
    expect(rest).toEqual(rest0);
    expect([status, s0, r0, a0, c0]).toEqual(['rejected', 'proposed', null, null, null]);
    expect(reviewedBy).not.toBeNull();
    expect(reviewedAt).not.toBeNull();
    expect(reviewComment).toBe('noisy');
    // Straight SQL on a plain connection (as a script with database access would do).
    const sql = await createConnection({ ...TEST_DB, database: ts.database });
    try {
      await expect(sql.query('UPDATE fit SET f0Hz = 1 WHERE id = ?', [id])).rejects.toThrow(/immutable/);
      await expect(sql.query("UPDATE fit SET calibration = '{}' WHERE id = ?", [id])).rejects.toThrow(/immutable/);
      await expect(sql.query('UPDATE fit SET version = 99 WHERE id = ?', [id])).rejects.toThrow(/immutable/);
      // Review fields stay writable (that is how a review is stored).
      await sql.query("UPDATE fit SET reviewComment = 'noisy (edited)' WHERE id = ?", [id]);
      // (deviceId, version) is unique: a second v1 for the device is refused by the database.
      await expect(
        sql.query('INSERT INTO fit (labId, deviceId, sweepId, version, kind, model, options, calibration, ndata, outlierCount, success, coreVersion, status) SELECT labId, deviceId, sweepId, version, kind, model, options, calibration, ndata, outlierCount, success, coreVersion, status FROM fit WHERE id = ?', [id]),
      ).rejects.toThrow(/Duplicate entry/);
    } finally {
      await sql.end();
    }
  });

  it('a fit that did not converge cannot be accepted (409)', async () => {
    const deviceId = await newDevice(ts.app, eng, `RV-flat-${++n}`);
    // A flat line carries no flux dependence: the core reports success = false.
    const flat = ['bias [mA],frequency [GHz]', ...Array.from({ length: 40 }, (_, i) => `${(i / 10 - 2).toFixed(1)},6.000000`)].join('\n');
    const { fit } = await uploadAndFit(ts.app, eng, deviceId, [{ name: 'flat.csv', text: flat }]);
    const full = await getFit(fit.id);
    expect(full.success).toBe(false);
    const r = await review(lead, fit.id, 'accept');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toMatch(/did not converge/);
    expect((await review(lead, fit.id, 'reject', 'no flux response')).status).toBe(200);
  });
});

describe('compare', () => {
  it('per common parameter: a, b, b − a, combined error sqrt(σa² + σb²) and the difference in those units', async () => {
    const deviceId = await newDevice(ts.app, eng, `RV-cmp-${++n}`);
    const { fit: a } = await uploadAndFit(ts.app, eng, deviceId, files.tuning(100));
    const { fit: b } = await uploadAndFit(ts.app, eng, deviceId, files.raw(101));
    const r = await request(ts.app).get(`/api/fits/${a.id}/compare/${b.id}`).set(bearer(exp));
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ sameDevice: true, sameSweep: false, a: { id: a.id }, b: { id: b.id } });
    const [ca, cb] = [(await getFit(a.id)).calibration, (await getFit(b.id)).calibration];
    const names = r.body.parameters.map((p: { name: string }) => p.name);
    expect(names).toEqual(expect.arrayContaining(['f0_hz', 'gamma0', 'asymmetry', 'flux_period', 'flux_offset']));
    for (const p of r.body.parameters) {
      const pa = ca.params[p.name];
      const pb = cb.params[p.name];
      expect(p.a.value).toBe(pa.value);
      expect(p.difference).toBe(pb.value - pa.value);
      if (pa.stderr !== null && pb.stderr !== null) {
        const comb = Math.sqrt(pa.stderr ** 2 + pb.stderr ** 2);
        expect(Math.abs(p.combinedStderr / comb - 1)).toBeLessThan(1e-12);
        if (comb > 0) expect(Math.abs(p.differenceInSigma / ((pb.value - pa.value) / comb) - 1)).toBeLessThan(1e-9);
      } else {
        expect(p.combinedStderr).toBeNull();
      }
    }
    // Two fits of the same truth agree within a few combined standard errors on f0.
    const f0 = r.body.parameters.find((p: { name: string }) => p.name === 'f0_hz');
    expect(Math.abs(f0.differenceInSigma)).toBeLessThan(5);
  });

  it('tuning against phase is refused (422 NOT_COMPARABLE); unknown fit → 404', async () => {
    const t = (await deviceWithFits(1, 110)).ids[0];
    const phaseDevice = await newDevice(ts.app, eng, `RV-cmp-phase-${++n}`, 'phase_only');
    const { fit: p } = await uploadAndFit(ts.app, eng, phaseDevice, files.phase(111));
    const r = await request(ts.app).get(`/api/fits/${t}/compare/${p.id}`).set(bearer(exp));
    expect(r.status).toBe(422);
    expect(r.body.error.code).toBe('NOT_COMPARABLE');
    expect((await request(ts.app).get(`/api/fits/${t}/compare/999999`).set(bearer(exp))).status).toBe(404);
  });
});

describe('export', () => {
  it('JSON and CSV attachments; the CSV holds the parameter and point tables; each export is audited', async () => {
    const deviceId = await newDevice(ts.app, eng, `RV-exp-${++n}`);
    const { fit } = await uploadAndFit(ts.app, eng, deviceId, files.tuning(120, TRUTH, 60));
    const full = await getFit(fit.id);
    const j = await request(ts.app).get(`/api/fits/${fit.id}/export?format=json`).set(bearer(exp)).buffer(true).parse((res, cb) => {
      let s = '';
      res.on('data', (c: Buffer) => (s += c.toString()));
      res.on('end', () => cb(null, s));
    });
    expect(j.status).toBe(200);
    expect(j.headers['content-disposition']).toMatch(/^attachment; filename="?RV-exp-\d+_fit-v1\.json"?$/);
    expect(JSON.parse(j.body as unknown as string)).toEqual(full.calibration);

    const c = await request(ts.app).get(`/api/fits/${fit.id}/export?format=csv`).set(bearer(exp));
    expect(c.status).toBe(200);
    expect(c.headers['content-type']).toMatch(/^text\/csv/);
    expect(c.headers['content-disposition']).toMatch(/^attachment; filename="?RV-exp-\d+_fit-v1\.csv"?$/);
    const text = c.text;
    const [, paramPart, pointPart] = text.split(/^# (?:parameters|points[^\r\n]*)\r?\n/m);
    const params = Papa.parse<Record<string, string>>(paramPart.trim(), { header: true }).data;
    const points = Papa.parse<Record<string, string>>(pointPart.trim(), { header: true }).data;
    expect(params.map((p) => p.parameter)).toEqual(Object.keys(full.calibration.params));
    expect(Number(params.find((p) => p.parameter === 'f0_hz')!.value)).toBe(full.calibration.params.f0_hz.value);
    expect(points).toHaveLength(60);
    expect(Number(points[5].measured)).toBe(full.calibration.points[5].measured);
    expect(points[5].outlier).toBe(String(full.calibration.points[5].outlier));

    expect((await request(ts.app).get(`/api/fits/${fit.id}/export?format=xml`).set(bearer(exp))).status).toBe(400);
    const ev = await ts.dataSource.query("SELECT COUNT(*) AS n FROM audit_event WHERE action = 'fit.export' AND subjectId = ?", [String(fit.id)]);
    expect(Number(ev[0].n)).toBe(2);
  });
});
