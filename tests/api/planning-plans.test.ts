// Drive plans over HTTP: the preview equals the command line's `plan --json` for the same inputs
// (in process and as the real `npm run cli` child process), refusals carry the core's message,
// saved plans are immutable (no route changes one; the database trigger refuses an UPDATE) and
// survive a restart unchanged, a newer accepted calibration makes them stale and a re-plan links
// back, notes are the author's or a lab lead's, exports and saves are audited, and the calibration
// e-mail reaches the experimentalists with plans on the device.
// Status codes: RFC 9110 §15.5.21 (422: understood, but the planner refuses the content).
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { createConnection } from 'mysql2/promise';
import { runPlan } from '@/calibration/cli/plan';
import { PlanError, planFromCalibration } from '@/calibration/planner';
import type { PlanRequest } from '@/calibration/planner/types';
import type { Plan } from '@/shared/api/planning';
import { bearer, demoUser, signInAs } from '../support/api';
import { TEST_DB } from '../support/ensureTestDb';
import { startTestServer, type TestServer } from '../support/testServer';
import { closeServer, deviceIdByName, files, newDevice, TRUTH, uploadAndFit } from '../support/calibration';

let ts: TestServer;
let exp: string;
let lead: string;
let eng: string;
let q4r1 = 0;
const dir = mkdtempSync(path.join(tmpdir(), 'fw-plan-'));
const ROOT = path.resolve(__dirname, '..', '..');

beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  [exp, lead, eng] = await Promise.all([signInAs(ts.app, 'experimentalist'), signInAs(ts.app, 'lab_lead'), signInAs(ts.app, 'device_engineer')]);
  q4r1 = await deviceIdByName(ts.app, exp, 'Q4-R1');
});
afterAll(() => closeServer(ts));

/** The command-line flag of each request field (calibration/cli/plan.ts); a field without one fails the test. */
const FLAGS: Partial<Record<keyof PlanRequest, string>> = {
  mode: 'mode', fluxPhi0: 'flux', bias: 'bias', targetPairRate: 'target-pair-rate', targetGainDb: 'target-gain-db', ql: 'ql', qc: 'qc',
  bandHz: 'band', bandCentreHz: 'band-centre', pumpFrequencyHz: 'pump-frequency', detuningHz: 'detuning', temperatureK: 'temperature',
  pumpPeriod: 'pump-period', attenuationDb: 'attenuation-db', thresholdPowerDbm: 'threshold-power-dbm', pumpLineZ0Ohm: 'pump-line-z0',
  coldStageLimitW: 'cold-stage-limit-w', uncertaintyDraws: 'draws', seed: 'seed', phaseVelocityMPerS: 'phase-velocity',
};
function flagsFor(req: PlanRequest): string[] {
  const out: string[] = [];
  for (const [k, v] of Object.entries(req)) {
    if (v === undefined) continue;
    const flag = FLAGS[k as keyof PlanRequest];
    if (!flag) throw new Error(`request field ${k} has no command-line flag`);
    // String(x) of a double reads back to the same double (ECMA-262 Number::toString).
    out.push(`--${flag}`, Array.isArray(v) ? v.join(',') : String(v));
  }
  return out;
}

async function calibrationFile(deviceId: number): Promise<{ file: string; fitId: number }> {
  const r = await request(ts.app).get(`/api/devices/${deviceId}/calibration`).set(bearer(exp));
  expect(r.status).toBe(200);
  const file = path.join(dir, `cal-${deviceId}-${r.headers['x-fluxwright-fit-id']}.json`);
  writeFileSync(file, JSON.stringify(r.body));
  return { file, fitId: Number(r.headers['x-fluxwright-fit-id']) };
}

const preview = (token: string, deviceId: number, req: PlanRequest, extra: Record<string, unknown> = {}) =>
  request(ts.app).post('/api/plans/preview').set(bearer(token)).send({ deviceId, request: req, ...extra });
const save = (token: string, deviceId: number, req: PlanRequest, note?: string) =>
  request(ts.app).post('/api/plans').set(bearer(token)).send({ deviceId, request: req, note });
const planCount = async () => Number((await ts.dataSource.query('SELECT COUNT(*) AS n FROM plan'))[0].n);

/** A device of our own with one accepted tuning-points calibration (the upload route, calibration/synth.ts input). */
async function calibratedDevice(name: string, seed: number) {
  const deviceId = await newDevice(ts.app, eng, name);
  const { fit } = await uploadAndFit(ts.app, eng, deviceId, files.tuning(seed, TRUTH, 120));
  expect((await request(ts.app).post(`/api/fits/${fit.id}/review`).set(bearer(eng)).send({ decision: 'accept' })).status).toBe(200);
  return { deviceId, fitId: fit.id };
}

describe('preview equals plan --json', () => {
  it.each([
    [
      'cavity, pair rate, power chain from the pump line (pump period, z0, cold-stage limit filled)',
      'Q4-R1',
      { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, attenuationDb: [30, 20, 10], temperatureK: 0.02, uncertaintyDraws: 300, seed: 7 },
      ['pumpPeriod', 'coldStageLimitW', 'pumpLineZ0Ohm'],
    ],
    [
      'cavity, gain target at a bias with given Q and threshold power (pump line not needed)',
      'Q4-R3',
      { mode: 'cavity', bias: 0.2, targetGainDb: 12, ql: 8000, qc: 12000, thresholdPowerDbm: -40, attenuationDb: [20, 20, 20], detuningHz: 1e5 },
      [],
    ],
    [
      'line mode on the phase calibration: band and pump frequency given',
      'Q7-L1',
      { mode: 'line', fluxPhi0: 0.25, targetPairRate: 1e4, pumpFrequencyHz: 1.1e10, bandHz: 2e9, bandCentreHz: 5e9, temperatureK: 0.05, uncertaintyDraws: 200 },
      [],
    ],
  ] as Array<[string, string, PlanRequest, string[]]>)('%s', async (_label, name, req, filled) => {
    const deviceId = await deviceIdByName(ts.app, exp, name);
    const { file, fitId } = await calibrationFile(deviceId);
    const r = await preview(exp, deviceId, req);
    expect(r.status).toBe(200);
    expect(r.body.fit.id).toBe(fitId);
    expect(r.body.filledFromPumpLine).toEqual(filled);
    // The request the core ran with: what was sent plus the pump-line fields.
    const pl = (await request(ts.app).get(`/api/devices/${deviceId}/pump-line`).set(bearer(exp))).body.pumpLine;
    const effective: PlanRequest = { ...req };
    const fromLine: Record<string, unknown> = { pumpPeriod: pl?.dcPeriod, coldStageLimitW: pl?.coldStageLimitW, pumpLineZ0Ohm: pl?.pumpLineZ0Ohm };
    for (const k of filled) (effective as unknown as Record<string, unknown>)[k] = fromLine[k];
    const cli = runPlan(['--calibration', file, ...flagsFor(effective), '--json']);
    expect(cli.exitCode).toBe(0);
    expect(r.body.result).toEqual(JSON.parse(cli.stdout));
  });

  it('the same through the real command line (npm run --silent cli -- plan … --json)', async () => {
    const { file } = await calibrationFile(q4r1);
    const req: PlanRequest = { mode: 'cavity', fluxPhi0: 0.28, targetPairRate: 3e4, pumpPeriod: 2e-3, attenuationDb: [20, 30], uncertaintyDraws: 100, seed: 3 };
    const r = await preview(exp, q4r1, req);
    expect(r.status).toBe(200);
    expect(r.body.filledFromPumpLine).toEqual(['coldStageLimitW', 'pumpLineZ0Ohm']);
    const stdout = execFileSync('npm', ['run', '--silent', 'cli', '--', 'plan', '--calibration', file, ...flagsFor({ ...req, coldStageLimitW: 1e-6, pumpLineZ0Ohm: 50 }), '--json'], {
      cwd: ROOT,
      encoding: 'utf8',
      timeout: 60_000,
    });
    expect(r.body.result).toEqual(JSON.parse(stdout));
  }, 90_000);

  it('rank: true adds the ranking of the calibrated range; every role may preview; nothing is written', async () => {
    const before = await planCount();
    for (const t of [exp, lead, eng]) {
      const r = await preview(t, q4r1, { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, uncertaintyDraws: 0 }, { rank: true });
      expect(r.status).toBe(200);
      expect(r.body.ranking.points.length).toBe(5);
      expect(r.body.ranking.points[0].rank).toBe(1);
    }
    expect(await planCount()).toBe(before);
  });

  it('an above-threshold target → 422 PLAN_REFUSED with the core’s message, code and option', async () => {
    const req: PlanRequest = { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e20 };
    const r = await preview(exp, q4r1, req);
    expect(r.status).toBe(422);
    const cal = (await request(ts.app).get(`/api/devices/${q4r1}/calibration`).set(bearer(exp))).body;
    const pl = (await request(ts.app).get(`/api/devices/${q4r1}/pump-line`).set(bearer(exp))).body.pumpLine;
    let expected: PlanError | undefined;
    try {
      planFromCalibration(cal, { ...req, pumpPeriod: pl.dcPeriod, attenuationDb: pl.attenuationDb, stageNames: pl.stageNames, coldStageLimitW: pl.coldStageLimitW, pumpLineZ0Ohm: pl.pumpLineZ0Ohm });
    } catch (e) {
      expected = e as PlanError;
    }
    expect(expected).toBeInstanceOf(PlanError);
    expect(r.body.error).toEqual({ code: 'PLAN_REFUSED', message: expected!.message, details: { code: 'above_threshold', option: 'target-pair-rate' } });
    // Saving the same is refused the same way and stores nothing.
    const before = await planCount();
    expect((await save(exp, q4r1, req)).body.error.code).toBe('PLAN_REFUSED');
    expect(await planCount()).toBe(before);
  });

  it.each([
    // Five columns in every row: a test function with one argument more than its row gets jest's `done`.
    ['line mode without a pump frequency', { mode: 'line', fluxPhi0: 0.3, targetPairRate: 1e4 }, 422, 'pump-frequency', 'Q4-R1'],
    ['both flux and bias', { mode: 'cavity', fluxPhi0: 0.3, bias: 0.1, targetPairRate: 1e4 }, 422, 'flux', 'Q4-R1'],
    ['cavity mode on a phase calibration', { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e4 }, 422, 'mode', 'Q7-L1'],
  ] as Array<[string, PlanRequest, number, string, string]>)('refused by the core: %s', async (_l, req, status, option, dev) => {
    const r = await preview(exp, await deviceIdByName(ts.app, exp, dev), req);
    expect(r.status).toBe(status);
    expect(r.body.error.code).toBe('PLAN_REFUSED');
    expect(r.body.error.details.option).toBe(option);
  });

  it('bad bodies → 400 naming the field; a device without an accepted calibration → 404 NO_ACTIVE_CALIBRATION', async () => {
    const bad = await preview(exp, q4r1, { mode: 'cavity', fluxPhi0: 'x' as unknown as number, targetPairRate: 1e5 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0].path).toBe('request.fluxPhi0');
    const unknown = await preview(exp, q4r1, { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, pumpPower: 3 } as PlanRequest);
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.message).toContain('pumpPower');
    const r5 = await deviceIdByName(ts.app, exp, 'Q7-R5');
    const none = await preview(exp, r5, { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5 });
    expect(none.status).toBe(404);
    expect(none.body.error.code).toBe('NO_ACTIVE_CALIBRATION');
  });
});

describe('saved plans', () => {
  it('save stores inputs and the core’s outputs; GET, list (newest first) and export return them; save and export are audited', async () => {
    const req: PlanRequest = { mode: 'cavity', fluxPhi0: 0.31, targetPairRate: 2e5, temperatureK: 0.02, uncertaintyDraws: 200 };
    const pv = await preview(exp, q4r1, req);
    const r = await save(exp, q4r1, req, 'first try');
    expect(r.status).toBe(201);
    const plan: Plan = r.body.plan;
    // Recomputed by the server with the core: the same object the preview showed.
    expect(plan.result).toEqual(pv.body.result);
    expect(plan).toMatchObject({
      deviceId: q4r1, deviceName: 'Q4-R1', batchCode: 'NB-2611', fitId: pv.body.fit.id, fitVersion: pv.body.fit.version, stale: false,
      authorName: demoUser('experimentalist').name, mode: 'cavity', replannedFromId: null, replannedById: null,
      filledFromPumpLine: ['pumpPeriod', 'attenuationDb', 'stageNames', 'coldStageLimitW', 'pumpLineZ0Ohm'],
      notes: [{ text: 'first try', authorName: demoUser('experimentalist').name }],
    });
    expect(plan.pumpLine).toMatchObject({ dcPeriod: 1.4e-3, attenuationDb: [20, 10, 20, 20] });
    expect(plan.result.uncertainty).toMatchObject({ draws: 200 });
    expect(plan.result.pump_frequency_hz).toBeGreaterThan(0);
    expect((await request(ts.app).get(`/api/plans/${plan.id}`).set(bearer(eng))).body.plan).toEqual(plan);
    const list = (await request(ts.app).get(`/api/plans?device=${q4r1}`).set(bearer(eng))).body.plans;
    expect(list[0]).toMatchObject({ id: plan.id, predictedPairRate: plan.result.predicted_pair_rate, generatorPowerDbm: plan.result.generator_power_dbm, noteCount: 1 });
    const times = list.map((p: { createdAt: string }) => Date.parse(p.createdAt));
    expect([...times].sort((a, b) => b - a)).toEqual(times);
    const ex = await request(ts.app).get(`/api/plans/${plan.id}/export`).set(bearer(eng));
    expect(ex.status).toBe(200);
    expect(ex.headers['content-disposition']).toMatch(/attachment; filename="?Q4-R1_plan-\d+\.json/);
    expect(JSON.parse(ex.text)).toEqual(plan);
    const actions = (await ts.dataSource.query("SELECT action FROM audit_event WHERE subjectType = 'plan' AND subjectId = ? ORDER BY id", [String(plan.id)])).map((a: { action: string }) => a.action);
    expect(actions).toEqual(['plan.save', 'plan.export']);
  });

  it('immutable: no route changes a plan; the trigger refuses a direct UPDATE; a note leaves the plan row as it was', async () => {
    const plan: Plan = (await save(exp, q4r1, { mode: 'cavity', fluxPhi0: 0.29, targetPairRate: 1e5, uncertaintyDraws: 0 })).body.plan;
    for (const m of ['put', 'patch', 'delete'] as const) {
      const r = await request(ts.app)[m](`/api/plans/${plan.id}`).set(bearer(lead)).send({ request: { mode: 'line' } });
      expect(r.status).toBe(404);
    }
    const sql = await createConnection({ ...TEST_DB, database: ts.database });
    try {
      await expect(sql.query('UPDATE plan SET predictedPairRate = 1 WHERE id = ?', [plan.id])).rejects.toThrow(/saved plans are immutable/);
      await expect(sql.query("UPDATE plan SET result = JSON_SET(result, '$.pump_frequency_hz', 0) WHERE id = ?", [plan.id])).rejects.toThrow(/immutable/);
    } finally {
      await sql.end();
    }
    expect((await request(ts.app).post(`/api/plans/${plan.id}/notes`).set(bearer(exp)).send({ text: 'ran it: 1.1e5 measured' })).status).toBe(201);
    const after: Plan = (await request(ts.app).get(`/api/plans/${plan.id}`).set(bearer(exp))).body.plan;
    expect({ ...after, notes: [] }).toEqual({ ...plan, notes: [] });
    expect(after.notes.map((n) => n.text)).toEqual(['ran it: 1.1e5 measured']);
  });

  it('notes: the author and a lab lead may annotate (201, audited); another role → 403 and nothing written; empty text → 400', async () => {
    const plan: Plan = (await save(exp, q4r1, { mode: 'cavity', fluxPhi0: 0.32, targetPairRate: 1e5, uncertaintyDraws: 0 })).body.plan;
    const note = (t: string, text: string) => request(ts.app).post(`/api/plans/${plan.id}/notes`).set(bearer(t)).send({ text });
    expect((await note(exp, 'author note')).status).toBe(201);
    const byLead = await note(lead, 'lead note');
    expect(byLead.status).toBe(201);
    expect(byLead.body.note).toMatchObject({ authorName: demoUser('lab_lead').name, text: 'lead note' });
    const byEng = await note(eng, 'engineer note');
    expect(byEng.status).toBe(403);
    expect((await note(exp, '   ')).status).toBe(400);
    // A plan saved by the lab lead: the experimentalist is not its author.
    const leads: Plan = (await save(lead, q4r1, { mode: 'cavity', fluxPhi0: 0.32, targetPairRate: 1e5, uncertaintyDraws: 0 })).body.plan;
    expect((await request(ts.app).post(`/api/plans/${leads.id}/notes`).set(bearer(exp)).send({ text: 'not mine' })).status).toBe(403);
    const got: Plan = (await request(ts.app).get(`/api/plans/${plan.id}`).set(bearer(eng))).body.plan;
    expect(got.notes.map((n) => n.text)).toEqual(['author note', 'lead note']);
    const n = await ts.dataSource.query("SELECT COUNT(*) AS n FROM audit_event WHERE action = 'plan.note' AND subjectId = ?", [String(plan.id)]);
    expect(Number(n[0].n)).toBe(2);
  });

  it('stale after a newer calibration is accepted; the e-mail reaches experimentalists with plans there only; re-plan links to the old plan', async () => {
    const { deviceId, fitId } = await calibratedDevice('PL-STALE', 31);
    // A second experimentalist without plans on the device (inserted directly: the invitation flow is tested elsewhere).
    await ts.dataSource.query("INSERT INTO `user` (labId, email, name, passwordHash, role, active) SELECT labId, 'exp2@demo.fluxwright.test', 'Second Experimentalist', 'x', 'experimentalist', 1 FROM `user` WHERE email = ?", [demoUser('experimentalist').email]);
    const req: PlanRequest = { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, pumpPeriod: 1e-3, attenuationDb: [60], uncertaintyDraws: 100 };
    const old: Plan = (await save(exp, deviceId, req)).body.plan;
    expect(old).toMatchObject({ fitId, stale: false, activeFitId: fitId });
    const { fit: fit2 } = await uploadAndFit(ts.app, eng, deviceId, files.tuning(32, { ...TRUTH, fluxOffset: 0.12 }, 120));
    expect((await request(ts.app).post(`/api/fits/${fit2.id}/review`).set(bearer(lead)).send({ decision: 'accept', comment: 'after thermal cycle' })).status).toBe(200);
    const mail = await ts.mailbox.waitFor((m) => m.subject.startsWith('PL-STALE: calibration v2 accepted'));
    expect(mail.to).toContain(demoUser('experimentalist').email);
    expect(mail.to).not.toContain('exp2@demo.fluxwright.test');
    const v1mails = (await ts.mailbox.messages()).filter((m) => m.subject.startsWith('PL-STALE: calibration v1 accepted'));
    expect(v1mails).toEqual([]); // nobody had plans on it when v1 was accepted

    const stale: Plan = (await request(ts.app).get(`/api/plans/${old.id}`).set(bearer(exp))).body.plan;
    expect(stale).toMatchObject({ stale: true, fitId, fitVersion: 1, activeFitId: fit2.id, activeFitVersion: 2 });
    expect((await request(ts.app).post(`/api/plans/${old.id}/replan`).set(bearer(eng)).send({})).status).toBe(403);
    const rp = await request(ts.app).post(`/api/plans/${old.id}/replan`).set(bearer(exp)).send({ note: 'on v2' });
    expect(rp.status).toBe(201);
    const fresh: Plan = rp.body.plan;
    expect(fresh).toMatchObject({ replannedFromId: old.id, fitId: fit2.id, fitVersion: 2, stale: false, request: old.request });
    // Same inputs on the new calibration: the core's answer for that calibration.
    const cal2 = (await request(ts.app).get(`/api/devices/${deviceId}/calibration`).set(bearer(exp))).body;
    expect(fresh.result).toEqual(JSON.parse(JSON.stringify(planFromCalibration(cal2, old.request))));
    expect(fresh.result.operating_bias).not.toBe(old.result.operating_bias); // the offset moved
    expect((await request(ts.app).get(`/api/plans/${old.id}`).set(bearer(exp))).body.plan.replannedById).toBe(fresh.id);
    const ev = await ts.dataSource.query("SELECT details FROM audit_event WHERE action = 'plan.replan' AND subjectId = ?", [String(fresh.id)]);
    const details = typeof ev[0].details === 'string' ? JSON.parse(ev[0].details) : ev[0].details;
    expect(details).toMatchObject({ replannedFrom: old.id, fromFitId: fitId, fitId: fit2.id });
  });

  it('the demo seed has plans by the demo experimentalist, one stale (made on Q7-L1 v1)', async () => {
    const plans = (await request(ts.app).get('/api/plans').set(bearer(exp))).body.plans as Array<{ deviceName: string; stale: boolean; fitVersion: number; activeFitVersion: number; authorName: string }>;
    const seeded = plans.filter((p) => ['Q7-L1', 'Q4-R2'].includes(p.deviceName) || p.authorName === demoUser('experimentalist').name);
    const l1 = seeded.find((p) => p.deviceName === 'Q7-L1')!;
    expect(l1).toMatchObject({ stale: true, fitVersion: 1, activeFitVersion: 2 });
    expect(seeded.find((p) => p.deviceName === 'Q4-R2')).toMatchObject({ stale: false });
  });
});

describe('restart', () => {
  it('a plan survives closing the server and starting a new one on the same database, unchanged', async () => {
    const jwtSecret = 'restart-test-secret-0123456789abcdef0123456789abcdef';
    const a = await startTestServer({ seedDemo: true, keepDatabase: true, jwtSecret });
    let b: TestServer | undefined;
    try {
      const t = await signInAs(a.app, 'experimentalist');
      const dev = await deviceIdByName(a.app, t, 'Q4-R2');
      const r = await request(a.app).post('/api/plans').set(bearer(t)).send({ deviceId: dev, request: { mode: 'cavity', bias: 0.33, targetGainDb: 10, uncertaintyDraws: 150 }, note: 'before restart' });
      expect(r.status).toBe(201);
      const before = (await request(a.app).get(`/api/plans/${r.body.plan.id}`).set(bearer(t))).body.plan;
      await closeServer(a);
      b = await startTestServer({ database: a.database, jwtSecret });
      const t2 = await signInAs(b.app, 'experimentalist');
      const after = (await request(b.app).get(`/api/plans/${before.id}`).set(bearer(t2))).body.plan;
      expect(after).toEqual(before);
      // The old server's token still works on the new one (same secret), and the plan is listed.
      const list = (await request(b.app).get(`/api/plans?device=${dev}`).set(bearer(t))).body.plans;
      expect(list.map((p: { id: number }) => p.id)).toContain(before.id);
    } finally {
      if (b) await closeServer(b);
    }
  }, 60_000);
});
