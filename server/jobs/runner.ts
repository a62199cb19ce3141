/**
 * Calibration jobs: parse and fit off the request thread on a piscina worker-thread pool, with the
 * job's state in MariaDB (table job) so progress and results survive a restart.
 *
 * - The upload route awaits `parse` (in a worker) and only stores the sweep when it parses.
 * - `enqueue` runs a queued job: claim it (queued → running, a conditional UPDATE so only one runner
 *   gets it), parse the sweep's stored bytes in a worker (or reuse the upload's parse), extract the
 *   traces of raw/Touchstone data in chunks over all threads, fit in a worker (progress is written
 *   to the row), then store the fit and finish the job in one transaction.
 * - `resume` (server start) re-queues jobs left queued or running by a stopped server; a job that
 *   was interrupted MAX_ATTEMPTS times is failed instead of being retried forever.
 * Runs one server process per database: a second process resuming would re-run the first one's jobs.
 */
import path from 'node:path';
import Piscina from 'piscina';
import type { DataSource } from 'typeorm';
import type { CalibrationJson } from '@/calibration/contract';
import type { SweepData } from '@/calibration/io';
import { extractionOptions, type CalibrateOptions } from '@/calibration/pipeline';
import { mergeExtractions, type SweepExtraction } from '@/calibration/resonator';
import type { FitOptions } from '@/shared/api/calibration';
import type { Config } from '../config';
import { JobEntity, type JobRow } from '../db/entities';
import type { Mailer } from '../mail/mailer';
import { sweepContents } from '../features/calibration/repository';
import { completeFitJob, failFitJob } from '../features/calibration/fitStore';
import {
  type ExtractChunkTask, type FitTask, type ParsedSweep, type ParseTask, type WorkerFile, type WorkerResult,
} from './calibrationWorker';

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
  /** The upload's own parse, kept until its job starts (saves parsing the file twice). */
  private readonly preparsed = new Map<number, SweepData>();
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

  /** Parse in a worker (the upload's first step); the data can be handed to enqueue(). */
  async parse(files: Array<{ name: string; content: Uint8Array }>, opts: FitOptions): Promise<WorkerResult<ParsedSweep>> {
    const { files: wf, transfer } = toWorkerFiles(files);
    const task: ParseTask = { files: wf, opts: coreOptions(opts) };
    return this.workers().run(task, { name: 'parseData', transferList: transfer });
  }

  /** Start warming the worker threads (server start), so the first upload does not pay for it. */
  warm(): void {
    const pool = this.workers();
    void pool.run({ files: [], opts: {} } satisfies ParseTask, { name: 'parse' }).catch(() => undefined);
  }

  enqueue(jobId: number, preparsed?: SweepData): void {
    if (this.closed || this.queued.has(jobId) || this.active.has(jobId)) return;
    if (preparsed) this.preparsed.set(jobId, preparsed);
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
    this.preparsed.clear();
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
    const preparsed = this.preparsed.get(jobId);
    this.preparsed.delete(jobId);
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
    const say = (progress: number, message: string) => {
      pending = { progress: Math.min(0.99, Math.max(0, progress)), message };
      if (Date.now() - lastWrite >= PROGRESS_WRITE_MS) flush();
    };

    const timeoutMs = this.deps.config.fitTimeoutMs ?? DEFAULT_FIT_TIMEOUT_MS;
    // A fit that never returns must not hold a thread for ever: piscina ends the worker on abort.
    const deadline = AbortSignal.any([signal, AbortSignal.timeout(timeoutMs)]);
    let result: WorkerResult<CalibrationJson>;
    try {
      result = await this.calibrate(job, preparsed, deadline, say);
    } catch (e) {
      await writing;
      // Aborted by close(): the row stays "running" and resume() picks it up after the restart.
      if (signal.aborted || this.closed) return;
      const message = deadline.aborted
        ? `the fit did not finish within ${Math.round(timeoutMs / 1000)} s and was stopped (FW_FIT_TIMEOUT_S)`
        : ((e as Error)?.message ?? String(e));
      result = { ok: false, error: { kind: 'internal', message, issues: [] } };
    }
    await writing;
    if (this.closed && !result.ok) return;
    if (result.ok) {
      await completeFitJob(ds, this.deps.mailer, this.deps.config, job, result.value, this.log);
    } else {
      await failFitJob(ds, job, result.error);
    }
  }

  /**
   * Parse (or take the upload's parse), extract raw/Touchstone traces in chunks spread over every
   * thread of the pool (traces are independent, so the result equals the serial extraction), then fit.
   */
  private async calibrate(
    job: JobRow,
    preparsed: SweepData | undefined,
    signal: AbortSignal,
    say: (progress: number, message: string) => void,
  ): Promise<WorkerResult<CalibrationJson>> {
    const pool = this.workers();
    const opts = coreOptions(job.options);
    let data = preparsed;
    if (!data) {
      const files = await sweepContents(this.deps.dataSource.manager, job.sweepId);
      if (!files.length) throw new Error(`sweep ${job.sweepId} has no stored files`);
      const { files: wf, transfer } = toWorkerFiles(files.map((f) => ({ name: f.name, content: f.content })));
      const parsed: WorkerResult<ParsedSweep> = await pool.run({ files: wf, opts } satisfies ParseTask, { name: 'parseData', transferList: transfer, signal });
      if (!parsed.ok) return parsed;
      data = parsed.value.data;
    }
    if (data.kind === 'tuning_points' || data.kind === 'phase_flux') {
      say(0.3, `parsed ${data.points.length} points; fitting`);
      return pool.run({ data, opts } satisfies FitTask, { name: 'fitData', signal });
    }
    const traces = data.traces;
    const n = traces.length;
    say(0.15, `parsed ${n} traces; extracting resonances`);
    const xopts = extractionOptions(data, opts);
    // A few chunks per thread so one slow chunk does not leave a core idle.
    const size = Math.max(1, Math.ceil(n / Math.max(1, this.threads * 4)));
    let done = 0;
    const chunks: Array<Promise<WorkerResult<SweepExtraction>>> = [];
    for (let i = 0; i < n; i += size) {
      const part = traces.slice(i, i + size);
      chunks.push(
        pool.run({ traces: part, opts: xopts } satisfies ExtractChunkTask, { name: 'extract', signal }).then((r: WorkerResult<SweepExtraction>) => {
          done += part.length;
          say(0.15 + 0.75 * (done / n), `extracted ${done} of ${n} traces`);
          return r;
        }),
      );
    }
    const parts = await Promise.all(chunks);
    const failed = parts.find((p) => !p.ok);
    if (failed && !failed.ok) return failed;
    const extraction = mergeExtractions(parts.map((p) => (p as { ok: true; value: SweepExtraction }).value));
    say(0.92, 'fitting the tuning curve');
    // The fit reads the extraction, not the traces: leave the bulky arrays out of the message.
    return pool.run({ data: { ...data, traces: [] }, opts, extraction } satisfies FitTask, { name: 'fitData', signal });
  }
}
