/**
 * Upload benchmark: a 201 bias × 2001 frequency raw sweep (≈ 16 MB CSV, calibration/synth) posted as
 * the demo engineer to a whole test server (real MariaDB from tests/support/ensureTestDb, worker
 * pool, fake SMTP), polled until the proposed fit is stored. Prints the request time (parse in a
 * worker + storing the bytes, plus up to FW_FIT_WAIT_MS waiting for the fit) and the time until the
 * fit exists. The first upload also starts the worker threads (tsx compiles the core once per thread).
 *   npx tsx scripts/bench/upload.ts      (or benchUpload() from scripts/bench/run.ts)
 */
import 'reflect-metadata';
import { performance } from 'node:perf_hooks';
import request from 'supertest';
import { rawComplexCsv } from '../../calibration/synth';
import { BENCH_DEVICE as device, BENCH_RAW_SHAPE } from './device';
import type { JobRunner } from '../../server/jobs/runner';
import { DEMO_USERS } from '../../server/db/seed';
import { startTestServer } from '../../tests/support/testServer';


export async function benchUpload(): Promise<void> {
  const ts = await startTestServer({ seedDemo: true });
  try {
    const eng = DEMO_USERS.find((u) => u.role === 'device_engineer')!;
    const sign = await request(ts.app).post('/api/auth/sign-in').send({ email: eng.email, password: eng.password });
    const auth = { Authorization: `Bearer ${sign.body.token}` };
    const devices = await request(ts.app).get('/api/devices').set(auth);
    const deviceId = (devices.body.devices as Array<{ id: number; name: string }>).find((d) => d.name === 'Q4-R1')!.id;
    const text = rawComplexCsv(device, BENCH_RAW_SHAPE);
    const bytes = Buffer.from(text, 'utf8');
    console.log(`upload benchmark: raw sweep 201 × 2001 points, ${(bytes.length / 1e6).toFixed(1)} MB, ${ts.config.workers} worker thread(s)`);
    const runs = [
      { label: 'cold (starts the workers)', waitMs: ts.config.fitWaitMs },
      { label: 'warm', waitMs: ts.config.fitWaitMs },
      // Answer without waiting for the fit: the request part alone (receive, parse in a worker, store).
      { label: 'warm, FW_FIT_WAIT_MS=0', waitMs: 0 },
    ];
    for (const { label, waitMs } of runs) {
      ts.config.fitWaitMs = waitMs; // the routes read the same config object
      const t0 = performance.now();
      const res = await request(ts.app)
        .post(`/api/devices/${deviceId}/sweeps`)
        .set(auth)
        .attach('files', bytes, { filename: 'bench_raw_201x2001.csv', contentType: 'text/csv' });
      const tAnswer = performance.now() - t0;
      if (res.status !== 201 && res.status !== 202) throw new Error(`upload failed: ${res.status} ${JSON.stringify(res.body)}`);
      let job = res.body.job;
      while (job.status !== 'succeeded' && job.status !== 'failed') {
        await new Promise((r) => setTimeout(r, 25));
        job = (await request(ts.app).get(`/api/jobs/${job.id}`).set(auth)).body.job;
      }
      const tFit = performance.now() - t0;
      if (job.status !== 'succeeded') throw new Error(`fit job failed: ${job.message}`);
      console.log(
        `upload 201×2001 raw sweep, ${label}`.padEnd(58) +
          ` answer ${tAnswer.toFixed(0).padStart(6)} ms (HTTP ${res.status})  proposed fit stored ${tFit.toFixed(0).padStart(6)} ms  (fit v${res.body.fit?.version ?? '?'}${res.status === 202 ? ' via polling' : ''})`,
      );
    }
  } finally {
    await (ts.app.locals.jobs as JobRunner).close();
    await ts.close();
  }
}

if (require.main === module) {
  benchUpload().catch((e) => {
    console.error(e);
    process.exitCode = 1;
  });
}
