/**
 * Plan-preview benchmark: a whole test server (real MariaDB from tests/support/ensureTestDb, demo
 * seed), signed in as the demo experimentalist; 20 concurrent clients on loopback each send
 * POST /api/plans/preview (Q4-R1, cavity, varying flux, default 1000 uncertainty draws) 50 times
 * one after another. Prints p50/p95/max latency and throughput (target p95 ≤ 50 ms).
 * The clients run in a worker thread (their own event loop), as separate client processes would, so
 * their HTTP work does not queue behind the server's on one loop; the in-process figure is printed too.
 *   npx tsx scripts/bench/preview.ts      (or benchPreview() from scripts/bench/run.ts)
 */
import 'reflect-metadata';
import { performance } from 'node:perf_hooks';
import { Worker } from 'node:worker_threads';
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

/** Load generator for a worker thread: plain JS, same request pattern as the in-process loop. */
const LOAD_SCRIPT = `
const { parentPort, workerData } = require('node:worker_threads');
const { performance } = require('node:perf_hooks');
const { url, token, deviceId, clients, perClient, draws } = workerData;
async function once(flux) {
  const t = performance.now();
  const r = await fetch(url + '/api/plans/preview', {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', Authorization: 'Bearer ' + token },
    body: JSON.stringify({ deviceId, request: { mode: 'cavity', fluxPhi0: flux, targetPairRate: 1e5, uncertaintyDraws: draws === null ? undefined : draws } }),
  });
  const body = await r.text();
  if (r.status !== 200) throw new Error('preview ' + r.status + ' ' + body.slice(0, 200));
  return performance.now() - t;
}
(async () => {
  const lat = [];
  const t0 = performance.now();
  await Promise.all(Array.from({ length: clients }, async (_, c) => {
    for (let k = 0; k < perClient; k++) lat.push(await once(0.15 + (0.25 * (c * perClient + k)) / (clients * perClient)));
  }));
  parentPort.postMessage({ lat, wall: performance.now() - t0 });
})().catch((e) => parentPort.postMessage({ error: String(e) }));
`;

function loadInWorker(url: string, token: string, deviceId: number, draws: number | null): Promise<{ lat: number[]; wall: number }> {
  return new Promise((resolve, reject) => {
    const w = new Worker(LOAD_SCRIPT, { eval: true, workerData: { url, token, deviceId, clients: CLIENTS, perClient: PER_CLIENT, draws } });
    w.once('message', (m: { lat: number[]; wall: number; error?: string }) => {
      void w.terminate();
      if (m.error) reject(new Error(m.error));
      else resolve(m);
    });
    w.once('error', reject);
  });
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
    const report = (label: string, lat: number[], wall: number, target: boolean) =>
      console.log(
        label.padEnd(58) +
          ` p50 ${f(quantile(lat, 0.5)).padStart(6)} ms  p95 ${f(quantile(lat, 0.95)).padStart(6)} ms  max ${f(Math.max(...lat)).padStart(6)} ms  ` +
          `${((lat.length / wall) * 1000).toFixed(0)} req/s${target ? '  target p95 ≤ 50 ms' : ''}`,
      );
    // Clients in their own thread (the fair figure for a server), default draws and none.
    for (const draws of [null, 200, 0]) {
      const { lat, wall } = await loadInWorker(ts.url, token, deviceId, draws);
      const what = draws === null ? '1000 draws (default)' : draws === 0 ? 'no uncertainty draws' : `${draws} draws (while dragging)`;
      report(`plan preview, ${CLIENTS} clients × ${PER_CLIENT} (client thread), ${what}`, lat, wall, draws === null);
    }
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
      report(`plan preview, ${CLIENTS} clients × ${PER_CLIENT} (same thread), ${draws === undefined ? '1000 draws (default)' : 'no uncertainty draws'}`, lat, wall, false);
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
