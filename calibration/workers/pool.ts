/**
 * Parallel per-trace extraction on a piscina worker-thread pool. Extraction of a 201-trace sweep is
 * the costly step of a raw calibration, and traces are independent, so it splits cleanly.
 * The worker file is TypeScript: the pool works when the process runs under tsx (command line,
 * server, benchmarks); under Jest callers use the serial path of calibration/pipeline.ts.
 */
import { availableParallelism } from 'node:os';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import Piscina from 'piscina';
import type { CalibrationJson } from '../contract';
import { mergeExtractions, type ExtractOptions, type SweepExtraction, type SweepTrace } from '../resonator';
import { calibrateSweepData, extractionOptions, parseSweepFiles, type CalibrateOptions, type SweepFile } from '../pipeline';
import type { ExtractTask } from './extractWorker';

export function createExtractionPool(threads = Math.max(1, availableParallelism())): Piscina {
  const ts = join(__dirname, 'extractWorker.ts');
  const filename = existsSync(ts) ? ts : join(__dirname, 'extractWorker.js');
  return new Piscina({ filename, minThreads: threads, maxThreads: threads, idleTimeout: 60_000 });
}

/** Same result as `extractSweep(traces, opts)`, computed in chunks on the pool, order kept. */
export async function extractSweepParallel(pool: Piscina, traces: readonly SweepTrace[], opts: ExtractOptions): Promise<SweepExtraction> {
  // A few chunks per thread so an unlucky slow chunk does not leave a core idle.
  const chunks = Math.min(traces.length, pool.options.maxThreads * 4);
  const size = Math.ceil(traces.length / Math.max(1, chunks));
  const tasks: Promise<SweepExtraction>[] = [];
  for (let i = 0; i < traces.length; i += size) {
    const task: ExtractTask = { traces: traces.slice(i, i + size), opts };
    tasks.push(pool.run(task));
  }
  return mergeExtractions(await Promise.all(tasks));
}

/** Parse, extract on the pool, fit: the parallel counterpart of `calibrateFiles`. */
export async function calibrateFilesParallel(pool: Piscina, files: readonly SweepFile[], opts: CalibrateOptions = {}): Promise<CalibrationJson> {
  const data = parseSweepFiles(files, opts);
  if (data.kind !== 'raw_complex' && data.kind !== 'touchstone') return calibrateSweepData(data, opts);
  const extraction = await extractSweepParallel(pool, data.traces, extractionOptions(data, opts));
  return calibrateSweepData(data, opts, extraction);
}
