// Bad input: 400 naming each field (zod issue path + message), malformed JSON → 400, oversize → 413
// (RFC 9110 §15.5.14 "Content Too Large"), and the database unchanged afterwards.
import request from 'supertest';
import { bearer, rowCounts, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';

let ts: TestServer;
let lead: string;
let deviceId: number;
beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true, config: { jsonLimit: '64kb' } });
  lead = await signInAs(ts.app, 'lab_lead');
  deviceId = (await request(ts.app).get('/api/devices').set(bearer(lead))).body.devices[0].id;
});
afterAll(async () => {
  await ts?.close();
});

interface BadCase {
  what: string;
  method: 'post' | 'patch';
  path: () => string;
  body: unknown;
  /** Every field path the answer must name. */
  fields: string[];
}

const CASES: BadCase[] = [
  { what: 'batch without code', method: 'post', path: () => '/api/batches', body: { wafer: 'W1' }, fields: ['code'] },
  { what: 'batch code of wrong type and bad date', method: 'post', path: () => '/api/batches', body: { code: 42, fabricatedOn: '18/03/2026' }, fields: ['code', 'fabricatedOn'] },
  { what: 'batch date that does not exist', method: 'post', path: () => '/api/batches', body: { code: 'NB-9', fabricatedOn: '2026-02-30' }, fields: ['fabricatedOn'] },
  { what: 'device missing name, batchId, geometry', method: 'post', path: () => '/api/devices', body: {}, fields: ['name', 'batchId', 'geometry'] },
  { what: 'device with unknown geometry and a negative Z0', method: 'post', path: () => '/api/devices', body: { name: 'D', batchId: 1, geometry: 'half_wave', designZ0Ohm: -50 }, fields: ['geometry', 'designZ0Ohm'] },
  { what: 'device with numbers as strings', method: 'post', path: () => '/api/devices', body: { name: 'D', batchId: '1', geometry: 'quarter_wave', designFrequencyHz: '6e9' }, fields: ['batchId', 'designFrequencyHz'] },
  { what: 'device in a batch that does not exist', method: 'post', path: () => '/api/devices', body: { name: 'D', batchId: 99999, geometry: 'quarter_wave' }, fields: ['batchId'] },
  { what: 'cooldown without date and fridge', method: 'post', path: () => `/api/devices/${deviceId}/cooldowns`, body: { notes: 'x' }, fields: ['startedOn', 'fridge'] },
  { what: 'invitation with bad e-mail and role', method: 'post', path: () => '/api/invitations', body: { email: 'not-an-email', name: 'X', role: 'admin' }, fields: ['email', 'role'] },
  { what: 'token with non-list scopes', method: 'post', path: () => '/api/tokens', body: { name: 'x', scopes: 'read' }, fields: ['scopes'] },
  { what: 'token with a bad scope inside the list', method: 'post', path: () => '/api/tokens', body: { name: 'x', scopes: ['read', 'Bad Scope'] }, fields: ['scopes.1'] },
  { what: 'user patch with unknown field', method: 'patch', path: () => '/api/users/2', body: { email: 'x@y.test' }, fields: ['(body)'] },
  { what: 'user patch with active as string', method: 'patch', path: () => '/api/users/2', body: { active: 'no' }, fields: ['active'] },
  { what: 'body that is a JSON array', method: 'post', path: () => '/api/batches', body: [1, 2], fields: ['(body)'] },
];

test.each(CASES.map((c) => [c.what, c] as const))('%s → 400 naming the fields, nothing written', async (_w, c) => {
  const before = await rowCounts(ts.dataSource);
  const res = await request(ts.app)[c.method](c.path()).set(bearer(lead)).send(c.body as object);
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('VALIDATION_FAILED');
  const paths = (res.body.error.details as Array<{ path: string; message: string }>).map((d) => d.path);
  for (const f of c.fields) expect(paths).toContain(f);
  for (const d of res.body.error.details) expect(d.message).toEqual(expect.any(String));
  for (const f of c.fields.filter((x) => !x.startsWith('('))) expect(res.body.error.message).toContain(f);
  expect(await rowCounts(ts.dataSource)).toEqual(before);
});

test.each([
  ['truncated object', '{"code": "NB-1"'],
  ['single quotes', "{'code': 'NB-1'}"],
  ['trailing comma', '{"code": "NB-1",}'],
])('malformed JSON (%s) → 400 that says the body is not valid JSON', async (_w, raw) => {
  const before = await rowCounts(ts.dataSource);
  const res = await request(ts.app).post('/api/batches').set(bearer(lead)).set('Content-Type', 'application/json').send(raw);
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('VALIDATION_FAILED');
  expect(res.body.error.message).toMatch(/not valid JSON/);
  expect(await rowCounts(ts.dataSource)).toEqual(before);
});

test('body over the JSON limit → 413 PAYLOAD_TOO_LARGE (RFC 9110 §15.5.14), nothing written', async () => {
  const before = await rowCounts(ts.dataSource);
  const res = await request(ts.app)
    .post('/api/batches')
    .set(bearer(lead))
    .send({ code: 'NB-BIG', processNotes: 'x'.repeat(70 * 1024) });
  expect(res.status).toBe(413);
  expect(res.body.error.code).toBe('PAYLOAD_TOO_LARGE');
  expect(res.body.error.message).toMatch(/limit/);
  expect(await rowCounts(ts.dataSource)).toEqual(before);
});

test('a field over its own length limit is a 400 naming it', async () => {
  const res = await request(ts.app).post('/api/batches').set(bearer(lead)).send({ code: 'NB-L', processNotes: 'x'.repeat(4001) });
  expect(res.status).toBe(400);
  expect(res.body.error.details).toEqual([{ path: 'processNotes', message: expect.stringMatching(/4000/) }]);
});

test('non-numeric path id → 400 naming params.id', async () => {
  const res = await request(ts.app).get('/api/devices/abc').set(bearer(lead));
  expect(res.status).toBe(400);
  expect(res.body.error.details[0].path).toBe('params.id');
});

test('unknown /api route → JSON 404 (RFC 9110 §15.5.5), with and without a token', async () => {
  for (const r of [request(ts.app).get('/api/no-such-thing'), request(ts.app).delete('/api/devices').set(bearer(lead))]) {
    const res = await r;
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expect(res.body.error.code).toBe('NOT_FOUND');
  }
});

test('unknown device id in the lab → 404', async () => {
  const res = await request(ts.app).get('/api/devices/987654').set(bearer(lead));
  expect(res.status).toBe(404);
  expect(res.body.error.code).toBe('NOT_FOUND');
});

test('no X-Powered-By, and helmet headers present', async () => {
  const res = await request(ts.app).get('/api/health');
  expect(res.headers['x-powered-by']).toBeUndefined();
  expect(res.headers['x-content-type-options']).toBe('nosniff');
  expect(res.headers['content-security-policy']).toMatch(/default-src 'self'/);
});
