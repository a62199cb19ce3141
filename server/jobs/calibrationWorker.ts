/**
 * Worker-thread side of the calibration jobs (loaded by worker.cjs under tsx's require hook, so the
 * same file runs under `npm start` and under Jest). Raw bytes come in, plain JSON goes out; errors
 * are returned as values so their file/row/column issues survive the thread boundary intact.
 * Relative imports only: the worker resolves modules without the @/ alias.
 */
import type { CalibrationJson } from '../../calibration/contract';
import { CalibrationRequestError, calibrateSweepData, extractionOptions, parseSweepFiles, type CalibrateOptions, type SweepFile } from '../../calibration/pipeline';
import { SweepParseError, type SweepData, type TuningPointsData } from '../../calibration/io';
import { extractSweep, type ExtractOptions, type SweepExtraction, type SweepTrace } from '../../calibration/resonator';
import type { ParseSummary, SweepIssue } from '../../shared/api/calibration';

export interface WorkerFile {
  name: string;
  bytes: Uint8Array;
}

export interface WorkerError {
  /** parse: the file cannot be read (issues say where); request: the core cannot act on the options; internal: anything else. */
  kind: 'parse' | 'request' | 'internal';
  message: string;
  issues: SweepIssue[];
}

export type WorkerResult<T> = { ok: true; value: T } | { ok: false; error: WorkerError };

export interface ParseTask {
  files: WorkerFile[];
  opts: CalibrateOptions;
}

const MAX_SUMMARY_WARNINGS = 50;

function decode(files: WorkerFile[]): SweepFile[] {
  // TextDecoder drops a UTF-8 byte-order mark; invalid bytes become U+FFFD, which the parser reports by cell.
  const dec = new TextDecoder('utf-8');
  return files.map((f) => ({ name: f.name, text: dec.decode(f.bytes) }));
}

function toWorkerError(e: unknown): WorkerError {
  if (e instanceof SweepParseError) {
    return {
      kind: 'parse',
      message: e.message,
      issues: e.issues.map((i) => ({ severity: i.severity, file: i.file, row: i.row, column: i.column, message: i.message })),
    };
  }
  if (e instanceof CalibrationRequestError) return { kind: 'request', message: e.message, issues: [] };
  const err = e as Error;
  // The core's own input errors (TuningInputError, bad trace input, …) carry a located message too.
  const named = err && typeof err.name === 'string' && /Error$/.test(err.name) && err.name !== 'Error' && err.name !== 'TypeError' && err.name !== 'RangeError';
  return { kind: named ? 'request' : 'internal', message: err?.message ?? String(e), issues: [] };
}

function range(xs: Iterable<number>): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of xs) {
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  return lo <= hi ? [lo, hi] : null;
}

export function summarise(data: SweepData): ParseSummary {
  const base = {
    kind: data.kind,
    biasUnit: data.biasUnit,
    biasQuantity: data.biasQuantity,
    warnings: data.issues.filter((i) => i.severity === 'warning').slice(0, MAX_SUMMARY_WARNINGS).map((i) => i.message),
  };
  if (data.kind === 'raw_complex' || data.kind === 'touchstone') {
    const lengths = data.traces.map((t) => t.freqHz.length);
    return {
      ...base,
      points: data.traces.length,
      freqPointsPerTrace: range(lengths),
      biasRange: range(data.traces.map((t) => t.bias)),
      frequencyRangeHz: range(data.traces.flatMap((t) => (t.freqHz.length ? [t.freqHz[0], t.freqHz[t.freqHz.length - 1]] : []))),
      geometry: data.geometry,
      sparam: data.sparam,
      probeFrequencyHz: null,
    };
  }
  if (data.kind === 'phase_flux') {
    return {
      ...base,
      points: data.points.length,
      freqPointsPerTrace: null,
      biasRange: range(data.points.map((p) => p.bias)),
      frequencyRangeHz: null,
      geometry: null,
      sparam: null,
      probeFrequencyHz: data.probeFrequencyHz,
    };
  }
  const tuning = data as TuningPointsData;
  return {
    ...base,
    points: tuning.points.length,
    freqPointsPerTrace: null,
    biasRange: range(tuning.points.map((p) => p.bias)),
    frequencyRangeHz: range(tuning.points.map((p) => p.frHz)),
    geometry: null,
    sparam: null,
    probeFrequencyHz: null,
  };
}

/** Parse only: the upload awaits this so a bad file is refused before anything is stored. */
export function parse(task: ParseTask): WorkerResult<ParseSummary> {
  try {
    return { ok: true, value: summarise(parseSweepFiles(decode(task.files), task.opts)) };
  } catch (e) {
    return { ok: false, error: toWorkerError(e) };
  }
}

export interface ParsedSweep {
  summary: ParseSummary;
  /** Parsed data (traces as Float64Arrays): handed back to the pool for extraction and fit. */
  data: SweepData;
}

/** Parse and return the data too, so the job can split the extraction over the pool. */
export function parseData(task: ParseTask): WorkerResult<ParsedSweep> {
  try {
    const data = parseSweepFiles(decode(task.files), task.opts);
    return { ok: true, value: { summary: summarise(data), data } };
  } catch (e) {
    return { ok: false, error: toWorkerError(e) };
  }
}

export interface ExtractChunkTask {
  traces: SweepTrace[];
  opts: ExtractOptions;
}

/** Per-trace extraction of one chunk of traces (the same call as the serial path, on fewer traces). */
export function extract(task: ExtractChunkTask): WorkerResult<SweepExtraction> {
  try {
    const x = extractSweep(task.traces, task.opts);
    // The per-trace fit objects are large and the fit needs only the JSON rows and the summary.
    return { ok: true, value: { traces: x.traces, results: x.results.map((r) => ({ ...r, fit: undefined })) as SweepExtraction['results'], summary: x.summary } };
  } catch (e) {
    return { ok: false, error: toWorkerError(e) };
  }
}

export interface FitTask {
  /** For raw/Touchstone data with `extraction`, the traces may be left out (the fit reads the extraction). */
  data: SweepData;
  opts: CalibrateOptions;
  extraction?: SweepExtraction;
}

/** The tuning or phase fit of parsed data (after a pooled extraction for raw/Touchstone data). */
export function fitData(task: FitTask): WorkerResult<CalibrationJson> {
  try {
    return { ok: true, value: calibrateSweepData(task.data, task.opts, task.extraction) };
  } catch (e) {
    return { ok: false, error: toWorkerError(e) };
  }
}

