// Small helpers shared by API and browser tests.
import request from 'supertest';
import type { Express } from 'express';
import { DEMO_USERS } from '@/server/db/seed';
import type { Role } from '@/shared/api/common';

export { DEMO_USERS };

export function demoUser(role: Role) {
  const u = DEMO_USERS.find((x) => x.role === role);
  if (!u) throw new Error(`no demo user with role ${role}`);
  return u;
}

/** Sign in through the API and return the bearer token. */
export async function signIn(app: Express, email: string, password: string): Promise<string> {
  const res = await request(app).post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.token as string;
}

export async function signInAs(app: Express, role: Role): Promise<string> {
  const u = demoUser(role);
  return signIn(app, u.email, u.password);
}

/** First link in a message text that contains `path` (e.g. "/accept-invitation"). */
export function linkIn(text: string, pathPart: string): URL {
  const m = (text.match(/https?:\/\/[^\s<>"')\]]+/g) ?? []).find((l) => l.includes(pathPart));
  if (!m) throw new Error(`no link containing ${pathPart} in:\n${text}`);
  return new URL(m);
}

export const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

/** Row counts of every application table, to prove a refused request wrote nothing. */
export async function rowCounts(ds: import('typeorm').DataSource): Promise<Record<string, number>> {
  const tables = ['lab', 'user', 'invitation', 'password_reset', 'api_token', 'audit_event', 'fab_batch', 'device', 'cooldown', 'mail_message'];
  const out: Record<string, number> = {};
  for (const t of tables) {
    const [row] = await ds.query(`SELECT COUNT(*) AS n FROM \`${t}\``);
    out[t] = Number(row.n);
  }
  return out;
}
