// Every calibration route × (allowed role → 2xx, no or bad token → 401, wrong role → 403 with
// nothing written). RFC 9110 §15.5.2 (401) and §15.5.4 (403), as in access.test.ts.
import request from 'supertest';
import { ROLES, type Role } from '@/shared/api/common';
import { insertFit } from '@/server/features/calibration/fitStore';
import { FitEntity } from '@/server/db/entities';
import { bearer, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';
import { closeServer, files, newDevice, tableCounts, upload, uploadAndFit } from '../support/calibration';

let ts: TestServer;
const tokens = {} as Record<Role, string>;
let deviceId = 0;
let fitA = 0;
let fitB = 0;
let jobId = 0;

beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  for (const r of ROLES) tokens[r] = await signInAs(ts.app, r);
  deviceId = await newDevice(ts.app, tokens.device_engineer, 'ACC-1');
  const a = await uploadAndFit(ts.app, tokens.device_engineer, deviceId, files.tuning(1, undefined, 80));
  fitA = a.fit.id;
  jobId = a.upload.body.job.id;
  fitB = (await uploadAndFit(ts.app, tokens.device_engineer, deviceId, files.tuning(2, undefined, 80))).fit.id;
  const r = await request(ts.app).post(`/api/fits/${fitA}/review`).set(bearer(tokens.lab_lead)).send({ decision: 'accept' });
  expect(r.status).toBe(200);
});
afterAll(() => closeServer(ts));

/** A fresh proposed fit (a copy of fit A's result as a new version), so each allowed review has one to review. */
async function freshProposedFit(): Promise<number> {
  const src = await ts.dataSource.getRepository(FitEntity).findOneByOrFail({ id: fitA });
  const row = await ts.dataSource.transaction((em) =>
    insertFit(em, { labId: src.labId, deviceId: src.deviceId, sweepId: src.sweepId, options: src.options, calibration: src.calibration, createdById: null }),
  );
  return row.id;
}

type Method = 'get' | 'post';
interface RouteCase {
  name: string;
  method: Method;
  path: () => string | Promise<string>;
  send?: (req: request.Test) => request.Test;
  allowed: readonly Role[];
  ok: number[];
}

const ALL = ROLES;
const MAKERS: Role[] = ['lab_lead', 'device_engineer'];

const ROUTES: RouteCase[] = [
  { name: 'POST /api/devices/:id/sweeps', method: 'post', path: () => `/api/devices/${deviceId}/sweeps`, allowed: MAKERS, ok: [201, 202],
    send: (req) => req.attach('files', Buffer.from(files.tuning(3, undefined, 60)[0].text), { filename: 't.csv', contentType: 'text/csv' }) },
  { name: 'GET /api/devices/:id/sweeps', method: 'get', path: () => `/api/devices/${deviceId}/sweeps`, allowed: ALL, ok: [200] },
  { name: 'GET /api/jobs/:id', method: 'get', path: () => `/api/jobs/${jobId}`, allowed: ALL, ok: [200] },
  { name: 'GET /api/devices/:id/fits', method: 'get', path: () => `/api/devices/${deviceId}/fits`, allowed: ALL, ok: [200] },
  { name: 'GET /api/fits/:id', method: 'get', path: () => `/api/fits/${fitB}`, allowed: ALL, ok: [200] },
  { name: 'POST /api/fits/:id/review', method: 'post', path: async () => `/api/fits/${await freshProposedFit()}/review`, allowed: MAKERS, ok: [200],
    send: (req) => req.send({ decision: 'reject', comment: 'access test' }) },
  { name: 'POST /api/fits/:id/refit', method: 'post', path: () => `/api/fits/${fitB}/refit`, allowed: MAKERS, ok: [201, 202],
    send: (req) => req.send({ model: 'approx' }) },
  { name: 'GET /api/fits/:a/compare/:b', method: 'get', path: () => `/api/fits/${fitA}/compare/${fitB}`, allowed: ALL, ok: [200] },
  { name: 'GET /api/devices/:id/calibration', method: 'get', path: () => `/api/devices/${deviceId}/calibration`, allowed: ALL, ok: [200] },
  { name: 'GET /api/fits/:id/export?format=csv', method: 'get', path: () => `/api/fits/${fitA}/export?format=csv`, allowed: ALL, ok: [200] },
  { name: 'GET /api/fits/:id/export?format=json', method: 'get', path: () => `/api/fits/${fitA}/export?format=json`, allowed: ALL, ok: [200] },
];

describe.each(ROUTES.map((r) => [r.name, r] as const))('%s', (_label, route) => {
  test.each(ALL.map((r) => [r]))('as %s', async (role) => {
    const path = await route.path();
    const before = await tableCounts(ts);
    let req = request(ts.app)[route.method](path).set(bearer(tokens[role]));
    if (route.send) req = route.send(req);
    const res = await req;
    if (route.allowed.includes(role)) {
      if (!route.ok.includes(res.status)) throw new Error(`${route.name} as ${role}: ${res.status} ${JSON.stringify(res.body)}`);
      expect(route.ok).toContain(res.status);
    } else {
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('FORBIDDEN');
      expect(await tableCounts(ts)).toEqual(before);
    }
  });

  test('401 without a token, with a garbage token and with an unknown API token; nothing written', async () => {
    const path = await route.path();
    const before = await tableCounts(ts);
    for (const h of [undefined, { Authorization: 'Bearer not-a-token' }, bearer('fwt_' + 'x'.repeat(43))]) {
      let req = request(ts.app)[route.method](path);
      if (h) req = req.set(h);
      if (route.send) req = route.send(req);
      const res = await req;
      expect({ h, status: res.status, code: res.body?.error?.code }).toEqual({ h, status: 401, code: 'UNAUTHENTICATED' });
    }
    expect(await tableCounts(ts)).toEqual(before);
  });
});

test('lab scripts upload with an API token (fwt_…) like a signed-in engineer', async () => {
  const t = await request(ts.app).post('/api/tokens').set(bearer(tokens.device_engineer)).send({ name: 'fridge script' });
  expect(t.status).toBe(201);
  const r = await upload(ts.app, t.body.token, deviceId, files.tuning(4, undefined, 60));
  expect([201, 202]).toContain(r.status);
  const cal = await request(ts.app).get(`/api/devices/${deviceId}/calibration`).set(bearer(t.body.token));
  expect(cal.status).toBe(200);
  expect(cal.body.schema).toBe('fluxwright.calibration/1');
});

test('another lab sees none of these records (404)', async () => {
  // A second lab, created directly: its lead must not reach the first lab's device, fit or job.
  const bcrypt = await import('bcryptjs');
  const [lab] = await ts.dataSource.query("INSERT INTO lab (name) VALUES ('Other lab') RETURNING id");
  await ts.dataSource.query("INSERT INTO user (labId, email, name, passwordHash, role, active) VALUES (?, 'other@lab.test', 'Other Lead', ?, 'lab_lead', 1)", [lab.id, await bcrypt.hash('other-lead-pass', 4)]);
  const sign = await request(ts.app).post('/api/auth/sign-in').send({ email: 'other@lab.test', password: 'other-lead-pass' });
  const other = sign.body.token as string;
  for (const p of [`/api/devices/${deviceId}/fits`, `/api/fits/${fitA}`, `/api/jobs/${jobId}`, `/api/devices/${deviceId}/calibration`, `/api/fits/${fitA}/export`, `/api/fits/${fitA}/compare/${fitB}`]) {
    const r = await request(ts.app).get(p).set(bearer(other));
    expect({ p, status: r.status }).toEqual({ p, status: 404 });
  }
  const rv = await request(ts.app).post(`/api/fits/${fitB}/review`).set(bearer(other)).send({ decision: 'accept' });
  expect(rv.status).toBe(404);
});
