// End-to-end account flows through the real fake SMTP sink: invitation, password reset,
// API tokens, deactivation. Each e-mailed link is read back from the caught message.
import request from 'supertest';
import { InvitationEntity, PasswordResetEntity, ApiTokenEntity } from '@/server/db/entities';
import { sha256Hex } from '@/server/auth/secrets';
import { bearer, demoUser, linkIn, rowCounts, signIn, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';

let ts: TestServer;
let lead: string;
beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  lead = await signInAs(ts.app, 'lab_lead');
});
afterAll(async () => {
  await ts?.close();
});

/** A fresh member of the demo lab, made through the invitation flow. */
async function member(email: string, role: string, password: string): Promise<{ token: string; id: number }> {
  await request(ts.app).post('/api/invitations').set(bearer(lead)).send({ email, name: email.split('@')[0], role }).expect(201);
  const link = linkIn((await ts.mailbox.waitFor((m) => m.to.includes(email))).text, '/accept-invitation');
  const acc = await request(ts.app).post('/api/invitations/accept').send({ token: link.searchParams.get('token'), password }).expect(200);
  return { token: acc.body.token, id: acc.body.user.id };
}

describe('invitation', () => {
  test('invite → e-mail → preview → accept → sign in; link works once', async () => {
    const email = 'Noor.Halvorsen@Lab.test';
    const created = await request(ts.app)
      .post('/api/invitations')
      .set(bearer(lead))
      .send({ email, name: 'Noor Halvorsen', role: 'device_engineer' });
    expect(created.status).toBe(201);
    expect(created.body.invitation).toMatchObject({ email: email.toLowerCase(), role: 'device_engineer', acceptedAt: null });
    // 7-day expiry, measured from the answer's own timestamps.
    const ttl = Date.parse(created.body.invitation.expiresAt) - Date.parse(created.body.invitation.createdAt);
    expect(ttl / 86400e3).toBeCloseTo(7, 3);

    const mail = await ts.mailbox.waitFor((m) => m.to.includes(email.toLowerCase()));
    expect(mail.subject).toMatch(/invited you/);
    const link = linkIn(mail.text, '/accept-invitation');
    expect(link.origin).toBe(ts.config.appUrl);
    const token = link.searchParams.get('token')!;
    expect(token.length).toBeGreaterThanOrEqual(43); // 32 random bytes in base64url

    // Only the hash is stored.
    const row = await ts.dataSource.getRepository(InvitationEntity).findOneByOrFail({ id: created.body.invitation.id });
    expect(row.tokenHash).toBe(sha256Hex(token));
    expect(JSON.stringify(row)).not.toContain(token);

    const preview = await request(ts.app).get(`/api/invitations/${encodeURIComponent(token)}`);
    expect(preview.status).toBe(200);
    expect(preview.body).toMatchObject({ email: email.toLowerCase(), name: 'Noor Halvorsen', role: 'device_engineer', labName: 'Cryo Device Group (demo)' });

    const accepted = await request(ts.app).post('/api/invitations/accept').send({ token, password: 'a-new-password-1' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email: email.toLowerCase(), role: 'device_engineer', active: true });
    const me = await request(ts.app).get('/api/auth/me').set(bearer(accepted.body.token));
    expect(me.body.user.name).toBe('Noor Halvorsen');
    await signIn(ts.app, email, 'a-new-password-1');

    const again = await request(ts.app).post('/api/invitations/accept').send({ token, password: 'another-password-2' });
    expect(again.status).toBe(404);
    expect((await request(ts.app).get(`/api/invitations/${token}`)).status).toBe(404);

    const list = await request(ts.app).get('/api/invitations').set(bearer(lead));
    expect(list.body.invitations.find((i: { id: number }) => i.id === created.body.invitation.id).acceptedAt).toEqual(expect.any(String));
    const audit = await request(ts.app).get('/api/audit').set(bearer(lead));
    const actions = audit.body.events.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['invitation.create', 'invitation.accept']));
  });

  test('an expired invitation is refused', async () => {
    await request(ts.app).post('/api/invitations').set(bearer(lead)).send({ email: 'late@lab.test', name: 'Late', role: 'experimentalist' }).expect(201);
    const mail = await ts.mailbox.waitFor((m) => m.to.includes('late@lab.test'));
    const token = linkIn(mail.text, '/accept-invitation').searchParams.get('token')!;
    await ts.dataSource.getRepository(InvitationEntity).update({ tokenHash: sha256Hex(token) }, { expiresAt: new Date(Date.now() - 1000) });
    const before = await rowCounts(ts.dataSource);
    const res = await request(ts.app).post('/api/invitations/accept').send({ token, password: 'whatever-password' });
    expect(res.status).toBe(404);
    expect(res.body.error.message).toMatch(/expired/);
    expect(await rowCounts(ts.dataSource)).toEqual(before);
  });

  test('inviting an existing account is a 409 and sends nothing', async () => {
    const before = await rowCounts(ts.dataSource);
    const res = await request(ts.app).post('/api/invitations').set(bearer(lead)).send({ email: demoUser('experimentalist').email, name: 'X', role: 'experimentalist' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CONFLICT');
    expect(await rowCounts(ts.dataSource)).toEqual(before);
  });

  test('accept with a too-short password is a 400 and leaves the invitation open', async () => {
    await request(ts.app).post('/api/invitations').set(bearer(lead)).send({ email: 'short@lab.test', name: 'Short', role: 'experimentalist' }).expect(201);
    const token = linkIn((await ts.mailbox.waitFor((m) => m.to.includes('short@lab.test'))).text, '/accept-invitation').searchParams.get('token')!;
    const res = await request(ts.app).post('/api/invitations/accept').send({ token, password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('password');
    expect((await request(ts.app).get(`/api/invitations/${token}`)).status).toBe(200);
  });
});

describe('password reset', () => {
  test('request → e-mail → confirm → old password refused, new one works; link single-use, 1 h expiry', async () => {
    const u = { email: 'forgetful@lab.test', password: 'first-password-1' };
    await member(u.email, 'experimentalist', u.password);
    const r = await request(ts.app).post('/api/auth/password-reset').send({ email: u.email.toUpperCase() });
    expect(r.status).toBe(202);
    expect(r.body).toEqual({ ok: true });
    const mail = await ts.mailbox.waitFor((m) => m.to.includes(u.email) && /reset/i.test(m.subject));
    const token = linkIn(mail.text, '/reset-password').searchParams.get('token')!;
    const row = await ts.dataSource.getRepository(PasswordResetEntity).findOneByOrFail({ tokenHash: sha256Hex(token) });
    expect((row.expiresAt.getTime() - row.createdAt.getTime()) / 3600e3).toBeCloseTo(1, 3);

    const ok = await request(ts.app).post('/api/auth/password-reset/confirm').send({ token, password: 'fresh-password-9' });
    expect(ok.status).toBe(200);
    expect((await request(ts.app).post('/api/auth/sign-in').send({ email: u.email, password: u.password })).status).toBe(401);
    await signIn(ts.app, u.email, 'fresh-password-9');
    const reuse = await request(ts.app).post('/api/auth/password-reset/confirm').send({ token, password: 'other-password-9' });
    expect(reuse.status).toBe(404);
  });

  test('unknown e-mail: same 202 answer, no e-mail, no row (no account enumeration)', async () => {
    const before = await rowCounts(ts.dataSource);
    const r = await request(ts.app).post('/api/auth/password-reset').send({ email: 'nobody@nowhere.test' });
    expect(r.status).toBe(202);
    expect(r.body).toEqual({ ok: true });
    await new Promise((res) => setTimeout(res, 200));
    expect(await rowCounts(ts.dataSource)).toEqual(before);
  });

  test('an expired reset link is refused', async () => {
    const u = demoUser('device_engineer');
    await request(ts.app).post('/api/auth/password-reset').send({ email: u.email }).expect(202);
    const token = linkIn((await ts.mailbox.waitFor((m) => m.to.includes(u.email))).text, '/reset-password').searchParams.get('token')!;
    await ts.dataSource.getRepository(PasswordResetEntity).update({ tokenHash: sha256Hex(token) }, { expiresAt: new Date(Date.now() - 1) });
    const res = await request(ts.app).post('/api/auth/password-reset/confirm').send({ token, password: 'fresh-password-9' });
    expect(res.status).toBe(404);
    await signIn(ts.app, u.email, u.password); // unchanged
  });
});

describe('API tokens', () => {
  test('create → shown once → use → lastUsedAt → revoke → 401', async () => {
    const eng = await signInAs(ts.app, 'device_engineer');
    const c = await request(ts.app).post('/api/tokens').set(bearer(eng)).send({ name: 'fridge script', scopes: ['read', 'write', 'read'] });
    expect(c.status).toBe(201);
    const secret: string = c.body.token;
    expect(secret.startsWith('fwt_')).toBe(true);
    expect(c.body.apiToken).toMatchObject({ name: 'fridge script', scopes: ['read', 'write'], lastUsedAt: null, revokedAt: null });
    const stored = await ts.dataSource.getRepository(ApiTokenEntity).findOneByOrFail({ id: c.body.apiToken.id });
    expect(stored.tokenHash).toBe(sha256Hex(secret));

    const list = await request(ts.app).get('/api/tokens').set(bearer(eng));
    expect(JSON.stringify(list.body)).not.toContain(secret);

    // Acts with the owner's role: engineer may create a batch, may not list users.
    expect((await request(ts.app).post('/api/batches').set(bearer(secret)).send({ code: 'NB-TOK' })).status).toBe(201);
    expect((await request(ts.app).get('/api/users').set(bearer(secret))).status).toBe(403);
    const used = await request(ts.app).get('/api/tokens').set(bearer(eng));
    expect(used.body.tokens.find((t: { id: number }) => t.id === c.body.apiToken.id).lastUsedAt).toEqual(expect.any(String));

    expect((await request(ts.app).delete(`/api/tokens/${c.body.apiToken.id}`).set(bearer(eng))).status).toBe(204);
    const after = await request(ts.app).get('/api/devices').set(bearer(secret));
    expect(after.status).toBe(401);
    expect(after.body.error.message).toMatch(/revoked/);
    // Revoking twice is harmless (DELETE is idempotent, RFC 9110 §9.2.2).
    expect((await request(ts.app).delete(`/api/tokens/${c.body.apiToken.id}`).set(bearer(eng))).status).toBe(204);
  });

  test("another member cannot revoke your token (404); the lab lead can", async () => {
    const eng = await signInAs(ts.app, 'device_engineer');
    const exp = await signInAs(ts.app, 'experimentalist');
    const c = await request(ts.app).post('/api/tokens').set(bearer(eng)).send({ name: 'x' });
    expect((await request(ts.app).delete(`/api/tokens/${c.body.apiToken.id}`).set(bearer(exp))).status).toBe(404);
    expect((await request(ts.app).get('/api/auth/me').set(bearer(c.body.token))).status).toBe(200);
    expect((await request(ts.app).delete(`/api/tokens/${c.body.apiToken.id}`).set(bearer(lead))).status).toBe(204);
    expect((await request(ts.app).get('/api/auth/me').set(bearer(c.body.token))).status).toBe(401);
  });
});

describe('users and deactivation', () => {
  test('a deactivated user can neither sign in nor use an existing JWT or API token', async () => {
    await request(ts.app).post('/api/invitations').set(bearer(lead)).send({ email: 'leaver@lab.test', name: 'Leaver', role: 'experimentalist' }).expect(201);
    const token = linkIn((await ts.mailbox.waitFor((m) => m.to.includes('leaver@lab.test'))).text, '/accept-invitation').searchParams.get('token')!;
    const acc = await request(ts.app).post('/api/invitations/accept').send({ token, password: 'leaver-password-1' });
    const jwtTok = acc.body.token;
    const api = (await request(ts.app).post('/api/tokens').set(bearer(jwtTok)).send({ name: 'x' })).body.token;

    const off = await request(ts.app).patch(`/api/users/${acc.body.user.id}`).set(bearer(lead)).send({ active: false });
    expect(off.status).toBe(200);
    expect(off.body.user.active).toBe(false);

    for (const t of [jwtTok, api]) {
      const r = await request(ts.app).get('/api/auth/me').set(bearer(t));
      expect(r.status).toBe(401);
      expect(r.body.error.message).toMatch(/deactivated/);
    }
    const s = await request(ts.app).post('/api/auth/sign-in').send({ email: 'leaver@lab.test', password: 'leaver-password-1' });
    expect(s.status).toBe(401);
    const listed = await request(ts.app).get('/api/users').set(bearer(lead));
    expect(listed.body.users.find((u: { email: string }) => u.email === 'leaver@lab.test').active).toBe(false);

    const on = await request(ts.app).patch(`/api/users/${acc.body.user.id}`).set(bearer(lead)).send({ active: true, role: 'device_engineer' });
    expect(on.body.user).toMatchObject({ active: true, role: 'device_engineer' });
    expect((await request(ts.app).get('/api/auth/me').set(bearer(jwtTok))).body.user.role).toBe('device_engineer');
  });

  test('a lead cannot demote or deactivate themselves (409)', async () => {
    const me = (await request(ts.app).get('/api/auth/me').set(bearer(lead))).body.user;
    for (const body of [{ active: false }, { role: 'experimentalist' }]) {
      const r = await request(ts.app).patch(`/api/users/${me.id}`).set(bearer(lead)).send(body);
      expect(r.status).toBe(409);
    }
  });

  test('sign-in: wrong password and unknown e-mail get the same 401; audit records sign-in and sign-out', async () => {
    const a = await request(ts.app).post('/api/auth/sign-in').send({ email: demoUser('lab_lead').email, password: 'wrong-password' });
    const b = await request(ts.app).post('/api/auth/sign-in').send({ email: 'ghost@lab.test', password: 'wrong-password' });
    expect([a.status, b.status]).toEqual([401, 401]);
    expect(a.body).toEqual(b.body);
    const t = await signInAs(ts.app, 'lab_lead');
    expect((await request(ts.app).post('/api/auth/sign-out').set(bearer(t))).status).toBe(204);
    const ev = (await request(ts.app).get('/api/audit').set(bearer(lead))).body.events;
    const actions = ev.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['auth.sign_in', 'auth.sign_out', 'auth.sign_in_failed', 'user.update', 'token.create', 'token.revoke']));
    expect(ev[0]).toMatchObject({ id: expect.any(Number), createdAt: expect.any(String) });
  });

  test('session expiry follows the configured lifetime (exp claim, RFC 7519 §4.1.4)', async () => {
    const r = await request(ts.app).post('/api/auth/sign-in').send({ email: demoUser('lab_lead').email, password: demoUser('lab_lead').password });
    const payload = JSON.parse(Buffer.from(r.body.token.split('.')[1], 'base64url').toString());
    expect(payload.exp - payload.iat).toBe(ts.config.jwtExpiresInSeconds);
    expect(Date.parse(r.body.expiresAt)).toBe(payload.exp * 1000);
    expect(payload).toMatchObject({ sub: String(r.body.user.id), role: 'lab_lead', lab: r.body.user.labId });
  });
});

describe('outbox', () => {
  test('lists caught mail with its links for the lab lead', async () => {
    const r = await request(ts.app).get('/api/outbox').set(bearer(lead));
    expect(r.status).toBe(200);
    const m = r.body.messages.find((x: { to: string }) => x.to.includes('late@lab.test'));
    expect(m.links[0]).toMatch(new RegExp(`^${ts.config.appUrl}/accept-invitation\\?token=`));
  });
});
