// Job state lives in MariaDB: jobs a stopped server left queued or running are picked up by the
// next server's start-up hook (JobRunner.resume) and complete from the stored sweep bytes.
import request from 'supertest';
import { JobEntity } from '@/server/db/entities';
import { JobRunner, MAX_ATTEMPTS } from '@/server/jobs/runner';
import { createSmtpMailer } from '@/server/mail/mailer';
import { bearer, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';
import { closeServer, files, jobsOf, newDevice, upload, uploadAndFit, waitForJob } from '../support/calibration';

let ts: TestServer;
let eng: string;
const extra: JobRunner[] = [];

beforeAll(async () => {
  // fitWaitMs 0: the upload answers 202 at once, so the job is still open when the server "stops".
  ts = await startTestServer({ seedDemo: true, config: { fitWaitMs: 0 } });
  eng = await signInAs(ts.app, 'device_engineer');
});
afterAll(async () => {
  for (const r of extra) await r.close();
  await closeServer(ts);
});

/** A second server process on the same database, as after a restart. */
function restartedRunner(): JobRunner {
  const r = new JobRunner({ dataSource: ts.dataSource, mailer: createSmtpMailer(ts.config), config: ts.config, log: () => undefined });
  extra.push(r);
  return r;
}

test('rows written as queued and as running (a crashed server) are resumed; a job interrupted too often is failed', async () => {
  const deviceId = await newDevice(ts.app, eng, 'JOB-rows');
  // A completed upload gives a sweep with stored bytes to refit from.
  const { fit } = await uploadAndFit(ts.app, eng, deviceId, files.tuning(6));
  const [{ labId }] = await ts.dataSource.query('SELECT labId FROM sweep WHERE id = ?', [fit.sweepId]);
  const repo = ts.dataSource.getRepository(JobEntity);
  const base = { labId: Number(labId), type: 'refit' as const, progress: 0, message: null, sweepId: fit.sweepId, fitId: null, sourceFitId: null, createdById: null };
  const queued = await repo.save({ ...base, status: 'queued' as const, options: { kind: 'tuning_points' as const, model: 'approx' as const }, attempts: 0 });
  const running = await repo.save({ ...base, status: 'running' as const, options: { kind: 'tuning_points' as const, model: 'exact' as const, symmetric: true }, attempts: 1, startedAt: new Date() });
  const hopeless = await repo.save({ ...base, status: 'running' as const, options: { kind: 'tuning_points' as const }, attempts: MAX_ATTEMPTS, startedAt: new Date() });

  const next = restartedRunner();
  const resumed = await next.resume();
  expect(resumed).toEqual(expect.arrayContaining([queued.id, running.id]));
  expect(resumed).not.toContain(hopeless.id);
  const [a, b] = [await waitForJob(ts.app, eng, queued.id), await waitForJob(ts.app, eng, running.id)];
  expect([a.job.status, b.job.status]).toEqual(['succeeded', 'succeeded']);
  const versions = [a.fit!.version, b.fit!.version].sort();
  expect(versions).toEqual([2, 3]);
  const fa = (await request(ts.app).get(`/api/fits/${a.fit!.id}`).set(bearer(eng))).body.fit;
  expect(fa.model).toBe('approx');
  const h = await repo.findOneByOrFail({ id: hopeless.id });
  expect(h.status).toBe('failed');
  expect(h.message).toMatch(/gave up after 3 attempts/);
});


test('two runners never run the same job twice (the claim is a conditional update)', async () => {
  const deviceId = await newDevice(ts.app, eng, 'JOB-claim');
  const r1 = restartedRunner();
  const r2 = restartedRunner();
  const up = await upload(ts.app, eng, deviceId, files.tuning(7));
  r1.enqueue(up.body.job.id);
  r2.enqueue(up.body.job.id);
  const done = await waitForJob(ts.app, eng, up.body.job.id);
  expect(done.job).toMatchObject({ status: 'succeeded', attempts: 1 });
  await new Promise((res) => setTimeout(res, 300));
  const [row] = await ts.dataSource.query('SELECT COUNT(*) AS n FROM fit WHERE deviceId = ?', [deviceId]);
  expect(Number(row.n)).toBe(1);
});

// Last: it stops the app's own runner.
test('an upload answered 202 is interrupted by a stop, resumed by the next start, and its fit is stored', async () => {
  const deviceId = await newDevice(ts.app, eng, 'JOB-restart');
  const r = await upload(ts.app, eng, deviceId, files.raw(5));
  expect(r.status).toBe(202);
  expect(r.body.job).toMatchObject({ status: expect.stringMatching(/queued|running/), fitId: null });
  // Stop the first server's runner: a running fit is aborted and its row stays queued/running.
  await jobsOf(ts).close();
  const left = await ts.dataSource.getRepository(JobEntity).findOneByOrFail({ id: r.body.job.id });
  expect(['queued', 'running']).toContain(left.status);
  expect(left.fitId).toBeNull();

  const next = restartedRunner();
  expect(await next.resume()).toContain(r.body.job.id);
  const done = await waitForJob(ts.app, eng, r.body.job.id);
  expect(done.job.status).toBe('succeeded');
  expect(done.fit).toMatchObject({ version: 1 });
  // The one interrupted run counts as an attempt when it had started.
  expect(done.job.attempts).toBe(left.status === 'running' ? 2 : 1);
});

