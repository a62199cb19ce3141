/**
 * Calibration jobs: parse and fit off the request thread on a piscina worker-thread pool, with the
 * job's state in MariaDB (table job) so progress and results survive a restart.
 *
 * - The upload route awaits `parse` (in a worker) and only stores the sweep when it parses.
 * - `enqueue` runs a queued job: claim it (queued → running, a conditional UPDATE so only one runner
 *   gets it), load the sweep's stored bytes, `calibrate` in a worker (progress comes back over a
 *   MessagePort and is written to the row), then store the fit and finish the job in one transaction.
 * - `resume` (server start) re-queues jobs left queued or running by a stopped server; a job that
 *   was interrupted MAX_ATTEMPTS times is failed instead of being retried forever.
 * Runs one server process per database: a second process resuming would re-run the first one's jobs.
 */
import { MessageChannel } from 'node:worker_threads';
import path from 'node:path';
import Piscina from 'piscina';
import type { DataSource } from 'typeorm';
import type { CalibrationJson } from '@/calibration/contract';
import type { CalibrateOptions } from '@/calibration/pipeline';
import type { FitOptions, ParseSummary } from '@/shared/api/calibration';
import type { Config } from '../config';
import { JobEntity, type JobRow } from '../db/entities';
import type { Mailer } from '../mail/mailer';
import { sweepContents } from '../features/calibration/repository';
import { completeFitJob, failFitJob } from '../features/calibration/fitStore';
import type { CalibrateTask, ParseTask, ProgressMessage, WorkerFile, WorkerResult } from './calibrationWorker';

export const MAX_ATTEMPTS = 3;
export const DEFAULT_FIT_TIMEOUT_MS = 300_000;
/** Progress writes are throttled: a 201-trace fit reports ~20 steps, the row needs only a few. */
const PROGRESS_WRITE_MS = 200;

export interface JobRunnerDeps {
  dataSource: DataSource;
  mailer: Mailer;
  config: Pick<Config, 'workers' | 'appUrl'> & Partial<Pick<Config, 'fitTimeoutMs'>>;
  log?: (msg: string, err?: unknown) => void;
}

/** The options the core takes, from the options stored with the job. */
export function coreOptions(o: FitOptions): CalibrateOptions {
  const out: CalibrateOptions = {};
  if (o.kind) out.kind = o.kind;
  if (o.model) out.model = o.model;
  if (o.geometry) out.geometry = o.geometry;
  if (o.z0Ohm !== undefined && o.z0Ohm !== null) out.z0Ohm = o.z0Ohm;
  if (o.loopInductanceH !== undefined && o.loopInductanceH !== null) out.loopInductanceH = o.loopInductanceH;
  if (o.probeFrequencyHz !== undefined && o.probeFrequencyHz !== null) out.probeFrequencyHz = o.probeFrequencyHz;
  if (o.symmetric !== undefined) out.symmetric = o.symmetric;
  if (o.loss) out.loss = o.loss;
  if (o.biasPattern) out.biasPattern = o.biasPattern;
  if (o.biasUnit) out.biasUnit = o.biasUnit;
  return out;
}

/** Fresh, exactly-sized copies: a Buffer may view a larger shared slab that cloning would copy whole. */
function toWorkerFiles(files: Array<{ name: string; content: Uint8Array }>): { files: WorkerFile[]; transfer: ArrayBuffer[] } {
  const out = files.map((f) => ({ name: f.name, bytes: new Uint8Array(f.content) }));
  return { files: out, transfer: out.map((f) => f.bytes.buffer as ArrayBuffer) };
}

export class JobRunner {
  private pool: Piscina | null = null;
  private readonly queue: number[] = [];
  private readonly queued = new Set<number>();
  private readonly active = new Map<number, { abort: AbortController; done: Promise<void> }>();
  private readonly waiters = new Map<number, Array<() => void>>();
  private closed = false;
  private readonly log: (msg: string, err?: unknown) => void;

  constructor(private readonly deps: JobRunnerDeps) {
    this.log = deps.log ?? ((m, e) => console.error(`[jobs] ${m}`, e ?? ''));
  }

  get threads(): number {
    return Math.max(1, this.deps.config.workers);
  }

  /** Created on first use, so servers (and tests) that never fit start no threads. */
  private workers(): Piscina {
    if (this.closed) throw new Error('the job runner is closed');
    this.pool ??= new Piscina({
      filename: path.join(__dirname, 'worker.cjs'),
      minThreads: this.threads,
      maxThreads: this.threads,
      // Idle threads are unref'd by piscina; keep them warm for a minute (tsx compiles the core once per thread).
      idleTimeout: 60_000,
    });
    return this.pool;
  }

  /** Parse in a worker (the upload's first step). */
  async parse(files: Array<{ name: string; content: Uint8Array }>, opts: FitOptions): Promise<WorkerResult<ParseSummary>> {
    const { files: wf, transfer } = toWorkerFiles(files);
    const task: ParseTask = { files: wf, opts: coreOptions(opts) };
    return this.workers().run(task, { name: 'parse', transferList: transfer });
  }

  /** Start warming the worker threads (server start), so the first upload does not pay for it. */
  warm(): void {
    const pool = this.workers();
    void pool.run({ files: [], opts: {} } satisfies ParseTask, { name: 'parse' }).catch(() => undefined);
  }

  enqueue(jobId: number): void {
    if (this.closed || this.queued.has(jobId) || this.active.has(jobId)) return;
    this.queued.add(jobId);
    this.queue.push(jobId);
    this.pump();
  }

  /** Resolves with the job row once it finished, or with its current row after `ms`. */
  async waitFor(jobId: number, ms: number): Promise<JobRow | null> {
    const repo = this.deps.dataSource.getRepository(JobEntity);
    const current = await repo.findOneBy({ id: jobId });
    if (!current || current.status === 'succeeded' || current.status === 'failed' || ms <= 0) return current;
    await new Promise<void>((resolve) => {
      const timer = setTimeout(finish, ms);
      const list = this.waiters.get(jobId) ?? [];
      function finish() {
        clearTimeout(timer);
        resolve();
      }
      list.push(finish);
      this.waiters.set(jobId, list);
    });
    return repo.findOneBy({ id: jobId });
  }

  /**
   * Server start: jobs a stopped server left queued or running go back on the queue (their sweep's
   * bytes are stored). Returns the ids re-queued.
   */
  async resume(): Promise<number[]> {
    const repo = this.deps.dataSource.getRepository(JobEntity);
    const left = await repo.find({ where: [{ status: 'queued' }, { status: 'running' }], order: { id: 'ASC' } });
    const ids: number[] = [];
    for (const j of left) {
      if (j.status === 'running' && j.attempts >= MAX_ATTEMPTS) {
        await repo.update(
          { id: j.id, status: 'running' },
          { status: 'failed', finishedAt: new Date(), message: `gave up after ${j.attempts} attempts: the server stopped during each of them` },
        );
        continue;
      }
      if (j.status === 'running') {
        await repo.update({ id: j.id, status: 'running' }, { status: 'queued', message: 'interrupted by a server restart; queued again' });
      }
      ids.push(j.id);
      this.enqueue(j.id);
    }
    return ids;
  }

  /** Stop taking work, abort running fits (their rows stay "running" and resume on the next start). */
  async close(): Promise<void> {
    this.closed = true;
    this.queue.length = 0;
    this.queued.clear();
    for (const a of this.active.values()) a.abort.abort();
    await Promise.all([...this.active.values()].map((a) => a.done));
    for (const list of this.waiters.values()) for (const w of list) w();
    this.waiters.clear();
    const pool = this.pool;
    this.pool = null;
    if (pool) await pool.destroy();
  }

  private pump(): void {
    while (!this.closed && this.active.size < this.threads && this.queue.length) {
      const id = this.queue.shift() as number;
      this.queued.delete(id);
      const abort = new AbortController();
      const done = this.run(id, abort.signal)
        .catch((e) => this.log(`job ${id} crashed`, e))
        .finally(() => {
          this.active.delete(id);
          const list = this.waiters.get(id) ?? [];
          this.waiters.delete(id);
          for (const w of list) w();
          this.pump();
        });
      this.active.set(id, { abort, done });
    }
  }

  private async run(jobId: number, signal: AbortSignal): Promise<void> {
    const ds = this.deps.dataSource;
    const repo = ds.getRepository(JobEntity);
    // Claim: only the runner whose UPDATE changed the row owns the job.
    const claim = await repo
      .createQueryBuilder()
      .update()
      .set({ status: 'running', attempts: () => 'attempts + 1', startedAt: new Date(), progress: 0.02, message: 'started' })
      .where('id = :id AND status = :queued', { id: jobId, queued: 'queued' })
      .execute();
    if (!claim.affected) return;
    const job = await repo.findOneByOrFail({ id: jobId });

    let lastWrite = 0;
    let pending: { progress: number; message: string } | null = null;
    let writing: Promise<unknown> = Promise.resolve();
    const flush = () => {
      if (!pending) return;
      const p = pending;
      pending = null;
      lastWrite = Date.now();
      writing = writing
        .then(() => repo.update({ id: jobId, status: 'running' }, { progress: p.progress, message: p.message }))
        .catch((e) => this.log(`job ${jobId}: progress write failed`, e));
    };
    const { port1, port2 } = new MessageChannel();
    port1.on('message', (m: ProgressMessage) => {
      pending = { progress: Math.min(0.99, Math.max(0, m.progress)), message: m.message };
      if (Date.now() - lastWrite >= PROGRESS_WRITE_MS) flush();
    });

    const timeoutMs = this.deps.config.fitTimeoutMs ?? DEFAULT_FIT_TIMEOUT_MS;
    let result: WorkerResult<CalibrationJson>;
    try {
      const files = await sweepContents(ds.manager, job.sweepId);
      if (!files.length) throw new Error(`sweep ${job.sweepId} has no stored files`);
      const { files: wf, transfer } = toWorkerFiles(files.map((f) => ({ name: f.name, content: f.content })));
      const task: CalibrateTask = { files: wf, opts: coreOptions(job.options), port: port2 };
      // A fit that never returns must not hold a thread for ever: piscina ends the worker on abort.
      const limit = AbortSignal.timeout(timeoutMs);
      result = await this.workers().run(task, { name: 'calibrate', transferList: [...transfer, port2], signal: AbortSignal.any([signal, limit]) });
    } catch (e) {
      port1.close();
      await writing;
      // Aborted by close(): the row stays "running" and resume() picks it up after the restart.
      if (signal.aborted || this.closed) return;
      const timedOut = e instanceof Error && /abort/i.test(e.name + e.message) && !signal.aborted;
      result = {
        ok: false,
        error: timedOut
          ? { kind: 'internal', message: `the fit did not finish within ${Math.round(timeoutMs / 1000)} s and was stopped (FW_FIT_TIMEOUT_S)`, issues: [] }
          : { kind: 'internal', message: (e as Error)?.message ?? String(e), issues: [] },
      };
    }
    port1.close();
    await writing;
    if (this.closed && !result.ok) return;
    if (result.ok) {
      await completeFitJob(ds, this.deps.mailer, this.deps.config, job, result.value, this.log);
    } else {
      await failFitJob(ds, job, result.error);
    }
  }
}
