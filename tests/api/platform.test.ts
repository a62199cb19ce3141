// Rate limits (RFC 6585 §4: 429 Too Many Requests, optional Retry-After), migrations, seed
// idempotence, the web-export router and the CSP built from the export's inline scripts.
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { buildHtmlRoutes, matchHtmlRoute } from '@/server/http/static';
import { seedDemo, DEMO_USERS } from '@/server/db/seed';
import { bearer, demoUser, rowCounts, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';

describe('rate limit', () => {
  let ts: TestServer;
  beforeAll(async () => {
    ts = await startTestServer({ seedDemo: true, rateLimit: { signIn: 3, passwordReset: 2, windowMs: 60_000 } });
  });
  afterAll(async () => {
    await ts?.close();
  });

  test('sign-in: the 4th attempt within the window gets 429 RATE_LIMITED with Retry-After', async () => {
    const u = demoUser('device_engineer');
    const statuses: number[] = [];
    for (let i = 0; i < 3; i++) {
      statuses.push((await request(ts.app).post('/api/auth/sign-in').send({ email: u.email, password: i === 2 ? u.password : 'nope' })).status);
    }
    expect(statuses).toEqual([401, 401, 200]);
    const r = await request(ts.app).post('/api/auth/sign-in').send({ email: u.email, password: u.password });
    expect(r.status).toBe(429);
    expect(r.body.error.code).toBe('RATE_LIMITED');
    expect(Number(r.headers['retry-after'])).toBeGreaterThan(0);
    // Other routes are not limited.
    expect((await request(ts.app).get('/api/health')).status).toBe(200);
  });

  test('password reset: limited separately', async () => {
    const s: number[] = [];
    for (let i = 0; i < 3; i++) s.push((await request(ts.app).post('/api/auth/password-reset').send({ email: 'x@y.test' })).status);
    expect(s).toEqual([202, 202, 429]);
  });
});

describe('database', () => {
  let ts: TestServer;
  beforeAll(async () => {
    ts = await startTestServer({ seedDemo: true });
  });
  afterAll(async () => {
    await ts?.close();
  });

  test('after the run no migration is pending and the entities match the schema exactly', async () => {
    expect(await ts.dataSource.showMigrations()).toBe(false);
    const diff = await ts.dataSource.driver.createSchemaBuilder().log();
    expect(diff.upQueries.map((q) => q.query)).toEqual([]);
  });

  test('seeding twice leaves the same counts; the demo lab has one user per role, 2 batches, 7 devices, 7 cooldowns', async () => {
    const first = await rowCounts(ts.dataSource);
    expect(await seedDemo(ts.dataSource, { bcryptCost: 4 })).toEqual({ created: false });
    expect(await rowCounts(ts.dataSource)).toEqual(first);
    expect(first).toMatchObject({ lab: 1, user: DEMO_USERS.length, fab_batch: 2, device: 7, cooldown: 7 });
    const users = await ts.dataSource.query('SELECT role FROM `user` ORDER BY role');
    expect(users.map((u: { role: string }) => u.role)).toEqual(['device_engineer', 'experimentalist', 'lab_lead']);
  });

  test('passwords are stored as bcrypt hashes of the configured cost', async () => {
    const [u] = await ts.dataSource.query('SELECT passwordHash FROM `user` WHERE email = ?', [demoUser('lab_lead').email]);
    // Modular crypt format $2b$<cost>$<22 salt + 31 hash chars> (bcryptjs writes $2b$) [from memory].
    expect(u.passwordHash).toMatch(/^\$2[aby]\$04\$[./A-Za-z0-9]{53}$/);
  });
});

describe('batches and devices', () => {
  let ts: TestServer;
  let eng: string;
  beforeAll(async () => {
    ts = await startTestServer({ seedDemo: true });
    eng = await signInAs(ts.app, 'device_engineer');
  });
  afterAll(async () => {
    await ts?.close();
  });

  test('create batch → device → cooldown; counts and round-tripped design values', async () => {
    const b = await request(ts.app).post('/api/batches').set(bearer(eng)).send({ code: ' NB-2701 ', wafer: 'W27', fabricatedOn: '2026-09-30', processNotes: 'thin Nb' });
    expect(b.status).toBe(201);
    expect(b.body.batch).toEqual({ id: expect.any(Number), code: 'NB-2701', wafer: 'W27', processNotes: 'thin Nb', fabricatedOn: '2026-09-30', deviceCount: 0 });
    const design = { designZ0Ohm: 49.7, designFrequencyHz: 6.123456789e9, loopInductanceH: 4.25e-11 };
    const d = await request(ts.app).post('/api/devices').set(bearer(eng)).send({ name: 'Q9-R1', batchId: b.body.batch.id, geometry: 'quarter_wave', chipPosition: 'D4', ...design });
    expect(d.status).toBe(201);
    // IEEE-754 doubles survive the DOUBLE column exactly.
    expect(d.body.device).toMatchObject({ name: 'Q9-R1', batchCode: 'NB-2701', chipPosition: 'D4', calibrationStatus: 'none', ...design });
    const c = await request(ts.app).post(`/api/devices/${d.body.device.id}/cooldowns`).set(bearer(eng)).send({ startedOn: '2026-10-02', fridge: 'Dilution fridge Cedar' });
    expect(c.status).toBe(201);
    const detail = await request(ts.app).get(`/api/devices/${d.body.device.id}`).set(bearer(eng));
    expect(detail.body.cooldowns).toEqual([expect.objectContaining({ startedOn: '2026-10-02', fridge: 'Dilution fridge Cedar', notes: null })]);
    const batches = await request(ts.app).get('/api/batches').set(bearer(eng));
    expect(batches.body.batches.find((x: { code: string }) => x.code === 'NB-2701').deviceCount).toBe(1);
  });

  test('duplicate batch code or device name in the lab → 409 naming the field, nothing written', async () => {
    const before = await rowCounts(ts.dataSource);
    const b = await request(ts.app).post('/api/batches').set(bearer(eng)).send({ code: 'NB-2611' });
    expect(b.status).toBe(409);
    expect(b.body.error.details[0].path).toBe('code');
    const d = await request(ts.app).post('/api/devices').set(bearer(eng)).send({ name: 'Q4-R1', batchId: 1, geometry: 'phase_only' });
    expect(d.status).toBe(409);
    expect(d.body.error.details[0].path).toBe('name');
    expect(await rowCounts(ts.dataSource)).toEqual(before);
  });

  test.each([
    ['search by name part', '?search=q7', ['Q7-L1', 'Q7-R5']],
    ['search is case-insensitive and matches chip position', '?search=a3', ['Q4-R1']],
    ['LIKE wildcards are literal', '?search=%25', []],
    ['batch by code', '?batch=NB-2614', ['Q7-L1', 'Q7-R5', 'Q8-R2', 'Q8-R4']],
    ['batch by id', '?batch=1', ['Q4-R1', 'Q4-R2', 'Q4-R3']],
    ['both', '?batch=NB-2611&search=R2', ['Q4-R2']],
  ])('device list: %s', async (_w, qs, names) => {
    const r = await request(ts.app).get(`/api/devices${qs}`).set(bearer(eng));
    expect(r.status).toBe(200);
    expect(r.body.devices.map((d: { name: string }) => d.name).filter((n: string) => !n.startsWith('Q9'))).toEqual(names);
  });
});

describe('web export serving', () => {
  let dir: string;
  let ts: TestServer;
  const bootstrap = 'globalThis.__BOOT__=true;';
  const page = (name: string) => `<!doctype html><html><head><script type="module">${bootstrap}</script></head><body>${name}</body></html>`;
  beforeAll(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'fw-dist-'));
    const files: Record<string, string> = {
      'index.html': 'HOME',
      'sign-in.html': 'SIGNIN',
      '(auth)/sign-in.html': 'SIGNIN',
      '(app)/devices/index.html': 'DEVICES',
      '(app)/devices/[id].html': 'DEVICE',
      '(app)/devices/new.html': 'NEWDEVICE',
      '(app)/account/index.html': 'ACCOUNT',
      'docs/[...rest].html': 'DOCS',
      '+not-found.html': 'NOTFOUND',
      '_sitemap.html': 'SITEMAP',
    };
    for (const [f, body] of Object.entries(files)) {
      mkdirSync(path.dirname(path.join(dir, f)), { recursive: true });
      writeFileSync(path.join(dir, f), page(body));
    }
    mkdirSync(path.join(dir, '_expo/static/js'), { recursive: true });
    writeFileSync(path.join(dir, '_expo/static/js/entry.js'), 'console.log(1)');
    ts = await startTestServer({ staticDir: dir });
  });
  afterAll(async () => {
    await ts?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  test.each([
    ['/', 'HOME', 200],
    ['/sign-in', 'SIGNIN', 200],
    ['/devices', 'DEVICES', 200],
    ['/devices/', 'DEVICES', 200],
    ['/devices/17', 'DEVICE', 200],
    ['/devices/new', 'NEWDEVICE', 200],
    ['/account', 'ACCOUNT', 200],
    ['/docs/a/b/c', 'DOCS', 200],
    ['/no/such/page', 'NOTFOUND', 404],
    ['/_sitemap', 'NOTFOUND', 404],
  ])('GET %s → the %s page', async (url, body, status) => {
    const r = await request(ts.app).get(url);
    expect(r.status).toBe(status);
    expect(r.text).toContain(`<body>${body}</body>`);
  });

  test('assets are served; /api stays JSON even with the export mounted', async () => {
    expect((await request(ts.app).get('/_expo/static/js/entry.js')).text).toBe('console.log(1)');
    const r = await request(ts.app).get('/api/devices/x/y');
    expect(r.status).toBe(404);
    expect(r.body.error.code).toBe('NOT_FOUND');
  });

  test("CSP allows the export's inline bootstrap by its SHA-256 hash, not by 'unsafe-inline'", async () => {
    const csp: string = (await request(ts.app).get('/sign-in')).headers['content-security-policy'];
    const scriptSrc = csp.split(';').find((d) => d.trim().startsWith('script-src '))!;
    // CSP3 hash-source: 'sha256-' + base64 of the digest of the element's text (W3C CSP Level 3 §2.3.1) [from memory].
    const h = createHash('sha256').update(bootstrap).digest('base64');
    expect(scriptSrc).toContain(`'sha256-${h}'`);
    expect(scriptSrc).not.toContain("'unsafe-inline'");
    expect(scriptSrc).toContain("'wasm-unsafe-eval'");
    expect(csp).not.toContain('upgrade-insecure-requests');
  });

  test('the route table prefers static segments over [param] and [param] over [...rest]', () => {
    const routes = buildHtmlRoutes(dir);
    expect(matchHtmlRoute(routes, '/devices/new')).toBe(path.join('(app)', 'devices', 'new.html'));
    expect(matchHtmlRoute(routes, '/devices/new/extra')).toBeUndefined();
    expect(matchHtmlRoute(routes, '/docs')).toBeUndefined();
  });
});
