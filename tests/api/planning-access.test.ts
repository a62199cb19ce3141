// Every planning route × (allowed role → 2xx, no token → 401, wrong role → 403 with nothing
// written). RFC 9110 §15.5.2 (401) and §15.5.4 (403), as in access.test.ts.
import request from 'supertest';
import { ROLES, type Role } from '@/shared/api/common';
import { bearer, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';
import { closeServer, deviceIdByName } from '../support/calibration';

let ts: TestServer;
const tokens = {} as Record<Role, string>;
let dev = 0;
let planByExp = 0;

const REQ = { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, uncertaintyDraws: 0 };
const PUMP_LINE = { dcPeriod: 1.5e-3, attenuationDb: [20, 20, 20], stageNames: [], thresholdPowerDbm: null, thresholdBias: null, coldStageLimitW: 1e-6, pumpLineZ0Ohm: 50, note: null };

beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  for (const r of ROLES) tokens[r] = await signInAs(ts.app, r);
  dev = await deviceIdByName(ts.app, tokens.experimentalist, 'Q4-R3');
  const p = await request(ts.app).post('/api/plans').set(bearer(tokens.experimentalist)).send({ deviceId: dev, request: REQ });
  expect(p.status).toBe(201);
  planByExp = p.body.plan.id;
});
afterAll(() => closeServer(ts));

async function counts(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of ['plan', 'plan_note', 'pump_line', 'spec_window', 'audit_event']) out[t] = Number((await ts.dataSource.query(`SELECT COUNT(*) AS n FROM \`${t}\``))[0].n);
  return out;
}

type Method = 'get' | 'post' | 'put' | 'delete';
interface Route {
  name: string;
  method: Method;
  path: () => string;
  body?: () => object;
  allowed: Role[];
  status: number;
}

const ALL = [...ROLES];
const ROUTES: Route[] = [
  { name: 'preview', method: 'post', path: () => '/api/plans/preview', body: () => ({ deviceId: dev, request: REQ }), allowed: ALL, status: 200 },
  { name: 'save', method: 'post', path: () => '/api/plans', body: () => ({ deviceId: dev, request: REQ }), allowed: ['experimentalist', 'lab_lead'], status: 201 },
  { name: 'list', method: 'get', path: () => `/api/plans?device=${dev}`, allowed: ALL, status: 200 },
  { name: 'get', method: 'get', path: () => `/api/plans/${planByExp}`, allowed: ALL, status: 200 },
  { name: 'replan', method: 'post', path: () => `/api/plans/${planByExp}/replan`, body: () => ({}), allowed: ['experimentalist', 'lab_lead'], status: 201 },
  // The author (the demo experimentalist) or a lab lead.
  { name: 'note', method: 'post', path: () => `/api/plans/${planByExp}/notes`, body: () => ({ text: 'checked' }), allowed: ['experimentalist', 'lab_lead'], status: 201 },
  { name: 'export', method: 'get', path: () => `/api/plans/${planByExp}/export`, allowed: ALL, status: 200 },
  { name: 'operating points', method: 'get', path: () => `/api/devices/${dev}/operating-points?mode=cavity&target=1e5&top=3`, allowed: ALL, status: 200 },
  { name: 'pump line get', method: 'get', path: () => `/api/devices/${dev}/pump-line`, allowed: ALL, status: 200 },
  { name: 'pump line put', method: 'put', path: () => `/api/devices/${dev}/pump-line`, body: () => PUMP_LINE, allowed: ALL, status: 200 },
  { name: 'compare', method: 'get', path: () => '/api/batches/compare', allowed: ALL, status: 200 },
  { name: 'compare csv', method: 'get', path: () => '/api/batches/compare.csv', allowed: ALL, status: 200 },
  { name: 'spec windows', method: 'get', path: () => '/api/spec-windows', allowed: ALL, status: 200 },
  { name: 'spec window put', method: 'put', path: () => '/api/spec-windows/asymmetry', body: () => ({ min: 0, max: 0.2 }), allowed: ['lab_lead'], status: 200 },
  { name: 'spec window delete', method: 'delete', path: () => '/api/spec-windows/asymmetry', allowed: ['lab_lead'], status: 204 },
];

function send(rt: Route, token?: string) {
  let q = request(ts.app)[rt.method](rt.path());
  if (token) q = q.set(bearer(token));
  return rt.body ? q.send(rt.body()) : q;
}

describe.each(ROUTES.map((r) => [r.name, r] as const))('%s', (_name, rt) => {
  it('no token → 401, nothing written', async () => {
    const before = await counts();
    const r = await send(rt);
    expect(r.status).toBe(401);
    expect(r.body.error.code).toBe('UNAUTHENTICATED');
    expect(await counts()).toEqual(before);
  });
  const denied = ROLES.filter((x) => !rt.allowed.includes(x));
  if (denied.length) {
    it.each(denied)('%s → 403, nothing written', async (role) => {
      const before = await counts();
      const r = await send(rt, tokens[role]);
      expect(r.status).toBe(403);
      expect(r.body.error.code).toBe('FORBIDDEN');
      expect(await counts()).toEqual(before);
    });
  }
  it.each(rt.allowed)(`%s → ${rt.status}`, async (role) => {
    // The delete needs a window to delete.
    if (rt.name === 'spec window delete') await send(ROUTES.find((x) => x.name === 'spec window put')!, tokens.lab_lead);
    const r = await send(rt, tokens[role]);
    expect(r.status).toBe(rt.status);
  });
});

it('another lab sees none of it: a plan id of this lab is 404 there', async () => {
  // A second lab with its own lead, straight in the database (sign-up flows are tested elsewhere).
  await ts.dataSource.query("INSERT INTO lab (name) VALUES ('Other lab (test)')");
  const [lab] = await ts.dataSource.query("SELECT id FROM lab WHERE name = 'Other lab (test)'");
  const { hashPassword } = await import('@/server/auth/passwords');
  await ts.dataSource.query("INSERT INTO `user` (labId, email, name, passwordHash, role, active) VALUES (?, 'lead@other.test', 'Other Lead', ?, 'lab_lead', 1)", [lab.id, await hashPassword('other-lead-2026', 4)]);
  const r = await request(ts.app).post('/api/auth/sign-in').send({ email: 'lead@other.test', password: 'other-lead-2026' });
  const t = r.body.token as string;
  expect((await request(ts.app).get(`/api/plans/${planByExp}`).set(bearer(t))).status).toBe(404);
  expect((await request(ts.app).post('/api/plans/preview').set(bearer(t)).send({ deviceId: dev, request: REQ })).status).toBe(404);
  expect((await request(ts.app).get('/api/plans').set(bearer(t))).body.plans).toEqual([]);
  expect((await request(ts.app).post(`/api/plans/${planByExp}/notes`).set(bearer(t)).send({ text: 'x' })).status).toBe(404);
});
