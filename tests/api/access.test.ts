// Every signed-in route × (allowed role → 2xx, no token → 401, bad/expired token → 401, wrong role → 403).
// Status meanings: RFC 9110 §15.5.2 (401: lacks valid authentication credentials) and §15.5.4
// (403: understood but refuses to fulfil; re-authenticating will not help).
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { ROLES, type Role } from '@/shared/api/common';
import { bearer, demoUser, rowCounts, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';

let ts: TestServer;
const tokens = {} as Record<Role, string>;
let deviceId = 0;
let experimentalistId = 0;
let n = 0;

beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  for (const r of ROLES) tokens[r] = await signInAs(ts.app, r);
  const d = await request(ts.app).get('/api/devices').set(bearer(tokens.experimentalist));
  deviceId = d.body.devices[0].id;
  const me = await request(ts.app).get('/api/auth/me').set(bearer(tokens.experimentalist));
  experimentalistId = me.body.user.id;
});
afterAll(async () => {
  await ts?.close();
});

type Method = 'get' | 'post' | 'patch' | 'delete';
interface RouteCase {
  name: string;
  method: Method;
  path: () => string | Promise<string>;
  body?: () => object;
  allowed: readonly Role[];
  ok: number;
}

const ALL = ROLES;
const MAKERS: Role[] = ['lab_lead', 'device_engineer'];
const LEAD: Role[] = ['lab_lead'];

async function ownTokenPath(role: Role): Promise<string> {
  const r = await request(ts.app).post('/api/tokens').set(bearer(tokens[role])).send({ name: `t${++n}` });
  return `/api/tokens/${r.body.apiToken.id}`;
}

// The role used for the "own token" DELETE path is the caller, set just before each call.
let caller: Role = 'lab_lead';

const ROUTES: RouteCase[] = [
  { name: 'GET /api/auth/me', method: 'get', path: () => '/api/auth/me', allowed: ALL, ok: 200 },
  { name: 'POST /api/auth/sign-out', method: 'post', path: () => '/api/auth/sign-out', allowed: ALL, ok: 204 },
  { name: 'GET /api/invitations', method: 'get', path: () => '/api/invitations', allowed: LEAD, ok: 200 },
  { name: 'POST /api/invitations', method: 'post', path: () => '/api/invitations', body: () => ({ email: `new${++n}@lab.test`, name: 'New Person', role: 'experimentalist' }), allowed: LEAD, ok: 201 },
  { name: 'GET /api/users', method: 'get', path: () => '/api/users', allowed: LEAD, ok: 200 },
  { name: 'PATCH /api/users/:id', method: 'patch', path: () => `/api/users/${experimentalistId}`, body: () => ({ role: 'experimentalist' }), allowed: LEAD, ok: 200 },
  { name: 'GET /api/tokens', method: 'get', path: () => '/api/tokens', allowed: ALL, ok: 200 },
  { name: 'POST /api/tokens', method: 'post', path: () => '/api/tokens', body: () => ({ name: `token ${++n}`, scopes: ['read'] }), allowed: ALL, ok: 201 },
  { name: 'DELETE /api/tokens/:id', method: 'delete', path: () => ownTokenPath(caller), allowed: ALL, ok: 204 },
  { name: 'GET /api/outbox', method: 'get', path: () => '/api/outbox', allowed: LEAD, ok: 200 },
  { name: 'GET /api/audit', method: 'get', path: () => '/api/audit', allowed: LEAD, ok: 200 },
  { name: 'GET /api/batches', method: 'get', path: () => '/api/batches', allowed: ALL, ok: 200 },
  { name: 'POST /api/batches', method: 'post', path: () => '/api/batches', body: () => ({ code: `NB-X${++n}` }), allowed: MAKERS, ok: 201 },
  { name: 'GET /api/devices', method: 'get', path: () => '/api/devices', allowed: ALL, ok: 200 },
  { name: 'POST /api/devices', method: 'post', path: () => '/api/devices', body: () => ({ name: `DEV-${++n}`, batchId: 1, geometry: 'quarter_wave' }), allowed: MAKERS, ok: 201 },
  { name: 'GET /api/devices/:id', method: 'get', path: () => `/api/devices/${deviceId}`, allowed: ALL, ok: 200 },
  { name: 'POST /api/devices/:id/cooldowns', method: 'post', path: () => `/api/devices/${deviceId}/cooldowns`, body: () => ({ startedOn: '2026-07-01', fridge: 'Fridge T' }), allowed: MAKERS, ok: 201 },
];

function call(method: Method, path: string) {
  const agent = request(ts.app);
  return agent[method](path);
}

function expiredJwt(): string {
  const u = demoUser('lab_lead');
  const past = Math.floor(Date.now() / 1000) - 3600;
  // RFC 7519 §4.1.4: a JWT at or after its "exp" time MUST NOT be accepted.
  return jwt.sign({ sub: '1', role: u.role, lab: 1, iat: past - 60, exp: past }, ts.config.jwtSecret, { algorithm: 'HS256' });
}

describe.each(ROUTES.map((r) => [r.name, r] as const))(
  '%s',
  (_label, route) => {
    test.each(ALL.map((r) => [r]))('as %s', async (role) => {
      caller = role;
      const path = await route.path();
      const before = await rowCounts(ts.dataSource);
      let req = call(route.method, path).set(bearer(tokens[role]));
      if (route.body) req = req.send(route.body());
      const res = await req;
      if (route.allowed.includes(role)) {
        expect({ status: res.status, body: res.body }).toMatchObject({ status: route.ok });
      } else {
        expect(res.status).toBe(403);
        expect(res.body.error.code).toBe('FORBIDDEN');
        expect(await rowCounts(ts.dataSource)).toEqual(before); // refused: nothing written
      }
      if (route.method === 'post' && path === '/api/auth/sign-out') tokens[role] = await signInAs(ts.app, role);
    });

    test('401 without a token, with a garbage token, an expired JWT, a forged JWT and an unknown API token', async () => {
      caller = 'lab_lead';
      const path = await route.path();
      const forged = jwt.sign({ sub: '1', role: 'lab_lead', lab: 1 }, 'not-the-server-secret-but-long-enough-000', { algorithm: 'HS256', expiresIn: 600 });
      const headers: Array<Record<string, string> | undefined> = [
        undefined,
        { Authorization: 'Bearer not-a-token' },
        { Authorization: 'Basic bGVhZDpwdw==' },
        bearer(expiredJwt()),
        bearer(forged),
        bearer('fwt_' + 'x'.repeat(43)),
      ];
      for (const h of headers) {
        let req = call(route.method, path);
        if (h) req = req.set(h);
        if (route.body) req = req.send(route.body());
        const res = await req;
        expect({ h, status: res.status, code: res.body?.error?.code }).toEqual({ h, status: 401, code: 'UNAUTHENTICATED' });
      }
    });
  },
);

test('an expired JWT is refused with a message that says so (RFC 7519 §4.1.4)', async () => {
  const res = await request(ts.app).get('/api/auth/me').set(bearer(expiredJwt()));
  expect(res.status).toBe(401);
  expect(res.body.error.message).toMatch(/expired/);
});

test('a JWT with alg "none" is refused even with a valid-looking payload', async () => {
  const unsigned = jwt.sign({ sub: '1', role: 'lab_lead', lab: 1 }, '', { algorithm: 'none', expiresIn: 600 });
  const res = await request(ts.app).get('/api/auth/me').set(bearer(unsigned));
  expect(res.status).toBe(401);
});

test('a JWT that claims lab_lead for an experimentalist acts with the database role', async () => {
  const forgedRole = jwt.sign({ sub: String(experimentalistId), role: 'lab_lead', lab: 1 }, ts.config.jwtSecret, { algorithm: 'HS256', expiresIn: 600 });
  const res = await request(ts.app).get('/api/users').set(bearer(forgedRole));
  expect(res.status).toBe(403);
});

test('public routes answer without a token', async () => {
  expect((await request(ts.app).get('/api/health')).body).toEqual({ ok: true, version: expect.any(String) });
  expect((await request(ts.app).post('/api/auth/password-reset').send({ email: 'nobody@x.test' })).status).toBe(202);
  expect((await request(ts.app).get('/api/invitations/unknown-token')).status).toBe(404);
});
