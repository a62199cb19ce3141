/**
 * Plan-preview benchmark: a whole test server (real MariaDB from tests/support/ensureTestDb, demo
 * seed), signed in as the demo experimentalist; 20 concurrent clients on loopback each send
 * POST /api/plans/preview (Q4-R1, cavity, varying flux, default 1000 uncertainty draws) 50 times
 * one after another. Prints p50/p95/max latency and throughput (target p95 ≤ 50 ms).
 *   npx tsx scripts/bench/preview.ts      (or benchPreview() from scripts/bench/run.ts)
 */
import 'reflect-metadata';
import { performance } from 'node:perf_hooks';
import type { JobRunner } from '../../server/jobs/runner';
import { DEMO_USERS } from '../../server/db/seed';
import { startTestServer } from '../../tests/support/testServer';

const CLIENTS = 20;
const PER_CLIENT = 50;

function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  const i = (s.length - 1) * q;
  const lo = Math.floor(i);
  return s[lo] + (s[Math.min(s.length - 1, lo + 1)] - s[lo]) * (i - lo);
}

export async function benchPreview(): Promise<void> {
  const ts = await startTestServer({ seedDemo: true });
  try {
    const exp = DEMO_USERS.find((u) => u.role === 'experimentalist')!;
    const post = (path: string, body: unknown, token?: string) =>
      fetch(`${ts.url}${path}`, {
        method: 'POST',
        headers: { 'Content-Type': 'application/json', ...(token ? { Authorization: `Bearer ${token}` } : {}) },
        body: JSON.stringify(body),
      });
    const token = ((await (await post('/api/auth/sign-in', { email: exp.email, password: exp.password })).json()) as { token: string }).token;
    const devices = (await (await fetch(`${ts.url}/api/devices`, { headers: { Authorization: `Bearer ${token}` } })).json()) as { devices: Array<{ id: number; name: string }> };
    const deviceId = devices.devices.find((d) => d.name === 'Q4-R1')!.id;
    const once = async (flux: number, draws?: number): Promise<number> => {
      const t = performance.now();
      const r = await post('/api/plans/preview', { deviceId, request: { mode: 'cavity', fluxPhi0: flux, targetPairRate: 1e5, uncertaintyDraws: draws } }, token);
      const body = await r.text();
      if (r.status !== 200) throw new Error(`preview at flux ${flux}: ${r.status} ${body.slice(0, 300)}`);
      return performance.now() - t;
    };
    for (let i = 0; i < 10; i++) await once(0.2 + i * 0.01); // warm-up (JIT, calibration cache)
    const f = (x: number) => x.toFixed(1);
    // Default draws (the figure the target is about), then without draws: HTTP, auth and database alone.
    for (const draws of [undefined, 0]) {
      const lat: number[] = [];
      const t0 = performance.now();
      await Promise.all(
        Array.from({ length: CLIENTS }, async (_, c) => {
          for (let k = 0; k < PER_CLIENT; k++) {
            // A different flux on every request (a slider being dragged): 0.15 … 0.40 Φ0, away from the sweet spot.
            lat.push(await once(0.15 + (0.25 * (c * PER_CLIENT + k)) / (CLIENTS * PER_CLIENT), draws));
          }
        }),
      );
      const wall = performance.now() - t0;
      console.log(
        `plan preview, ${CLIENTS} clients × ${PER_CLIENT}, ${draws === undefined ? '1000 draws (default)' : 'no uncertainty draws'}`.padEnd(58) +
          ` p50 ${f(quantile(lat, 0.5)).padStart(6)} ms  p95 ${f(quantile(lat, 0.95)).padStart(6)} ms  max ${f(Math.max(...lat)).padStart(6)} ms  ` +
          `${((lat.length / wall) * 1000).toFixed(0)} req/s${draws === undefined ? '  target p95 ≤ 50 ms' : ''}`,
      );
    }
  } finally {
    await (ts.app.locals.jobs as JobRunner).close();
    await ts.close();
  }
}

if (require.main === module) {
  benchPreview().catch((e) => {
    console.error(e);
    process.exit(1);
  });
}
