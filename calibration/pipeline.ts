/**
 * From sweep files to the calibration JSON: parse → (per-trace extraction) → tuning or phase fit.
 * The command line, the server's fit jobs and the benchmarks all go through here, so every caller
 * gets the same numbers for the same file.
 */
import type { CalibrationJson, Geometry, InputKind, TuningModel } from './contract';
import type { Loss } from './fit/types';
import { parseSweepText, parseTouchstoneSet, type SweepData, type RawSweepData } from './io';
import { extractSweep, type SweepExtraction, type ExtractOptions } from './resonator';
import { fitTuningCurve } from './tuning/fitTuning';
import { fitPhaseVsFlux } from './tuning/phaseFit';
import { tuningResultToCalibrationJson, phaseResultToCalibrationJson } from './tuning/calibrationJson';
import { CORE_VERSION } from './version';

export interface SweepFile {
  name: string;
  text: string;
  /** Bias of a Touchstone file when not read from its name. */
  bias?: number;
}

export interface CalibrateOptions {
  kind?: InputKind;
  model?: TuningModel;
  geometry?: Geometry;
  z0Ohm?: number | null;
  loopInductanceH?: number | null;
  probeFrequencyHz?: number | null;
  symmetric?: boolean;
  loss?: Loss;
  /** Touchstone sets: regular expression for the bias in the file name; unit when the name has none. */
  biasPattern?: string;
  biasUnit?: string;
  /** Known cable delay for the per-trace extraction, s. */
  delayS?: number;
  minSnr?: number;
  /** Phase-only line: phase velocity for L_eff, m/s. */
  phaseVelocityMps?: number | null;
}

/** Raised for a request the core cannot act on (missing probe frequency, no usable traces). */
export class CalibrationRequestError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'CalibrationRequestError';
  }
}

export function parseSweepFiles(files: readonly SweepFile[], opts: CalibrateOptions = {}): SweepData {
  if (files.length === 0) throw new CalibrationRequestError('no sweep file given');
  const touchstone = opts.kind === 'touchstone' || files.length > 1 || /\.s\d+p$/i.test(files[0].name);
  if (touchstone) {
    return parseTouchstoneSet(
      files.map((f) => ({ name: f.name, text: f.text, bias: f.bias })),
      { biasPattern: opts.biasPattern, biasUnit: opts.biasUnit, geometry: opts.geometry },
    );
  }
  return parseSweepText(files[0].name, files[0].text, {
    kind: opts.kind,
    geometry: opts.geometry,
    probeFrequencyHz: opts.probeFrequencyHz ?? undefined,
  });
}

export function extractionOptions(data: RawSweepData, opts: CalibrateOptions): ExtractOptions {
  return { geometry: opts.geometry ?? data.geometry, delayS: opts.delayS, minSnr: opts.minSnr };
}

/**
 * Fits already-parsed sweep data. For raw or Touchstone data a per-trace extraction done elsewhere
 * (a worker pool, see calibration/workers) may be passed in; otherwise it runs here, serially.
 */
export function calibrateSweepData(data: SweepData, opts: CalibrateOptions = {}, extraction?: SweepExtraction): CalibrationJson {
  // Parse warnings already name their file, row and column.
  const parseWarnings = data.issues.map((i) => i.message);
  if (data.kind === 'phase_flux') {
    const probe = opts.probeFrequencyHz ?? data.probeFrequencyHz;
    if (!probe) {
      throw new CalibrationRequestError(
        `${data.file}: the probe frequency is not stated in the file; give it (--probe-frequency HZ)`,
      );
    }
    const r = fitPhaseVsFlux(data.points, {
      probeFrequencyHz: probe,
      symmetric: opts.symmetric,
      loss: opts.loss,
      biasUnit: data.biasUnit,
      z0Ohm: opts.z0Ohm ?? null,
      loopInductanceH: opts.loopInductanceH ?? null,
      phaseVelocityMps: opts.phaseVelocityMps ?? null,
    });
    const json = phaseResultToCalibrationJson(r, {
      kind: 'phase_flux',
      rows: data.points.map((p) => p.row),
      source: data.file,
      coreVersion: CORE_VERSION,
    });
    json.warnings = [...parseWarnings, ...json.warnings];
    return json;
  }

  const tuningOptions = {
    model: opts.model ?? 'exact',
    symmetric: opts.symmetric,
    loss: opts.loss,
    z0Ohm: opts.z0Ohm ?? null,
    loopInductanceH: opts.loopInductanceH ?? null,
    biasUnit: data.biasUnit,
  } as const;

  if (data.kind === 'tuning_points') {
    const r = fitTuningCurve(
      data.points.map((p) => ({ bias: p.bias, frHz: p.frHz, sigmaHz: p.sigmaHz ?? null })),
      tuningOptions,
    );
    const json = tuningResultToCalibrationJson(r, {
      kind: 'tuning_points',
      rows: data.points.map((p) => p.row),
      source: data.file,
      coreVersion: CORE_VERSION,
    });
    json.warnings = [...parseWarnings, ...json.warnings];
    return json;
  }

  // Raw complex traces or a Touchstone set: one resonance per bias point, then the tuning fit on
  // the traces that gave a trustworthy resonance. Flagged traces stay in `traces` with their reason.
  const xopts = extractionOptions(data, opts);
  extraction ??= extractSweep(data.traces, xopts);
  const good = extraction.traces
    .map((t, i) => ({ t, i }))
    .filter(({ t }) => t.flag === null && t.fr_hz !== null);
  if (good.length === 0) {
    throw new CalibrationRequestError(
      `${describeFiles(data.file)}: no trace gave a usable resonance (${summaryText(extraction)})`,
    );
  }
  const r = fitTuningCurve(
    good.map(({ t }) => ({ bias: t.bias, frHz: t.fr_hz as number, sigmaHz: t.fr_stderr_hz ?? null })),
    tuningOptions,
  );
  const json = tuningResultToCalibrationJson(r, {
    kind: data.kind,
    rows: good.map(({ t }) => (t.rows ? t.rows[0] : null)),
    source: data.file,
    geometry: xopts.geometry,
    coreVersion: CORE_VERSION,
  });
  json.traces = extraction.traces;
  json.derived = { ...json.derived, trace_summary: extraction.summary, fitted_trace_indices: good.map(({ i }) => i) };
  const flagged = extraction.traces.length - good.length;
  const warnings = [...parseWarnings];
  if (flagged > 0) warnings.push(`${flagged} of ${extraction.traces.length} traces were flagged and left out of the tuning fit (${summaryText(extraction)})`);
  json.warnings = [...warnings, ...json.warnings];
  return json;
}

/** Parse and fit in one call. */
export function calibrateFiles(files: readonly SweepFile[], opts: CalibrateOptions = {}): CalibrationJson {
  return calibrateSweepData(parseSweepFiles(files, opts), opts);
}

function describeFiles(file: string | string[]): string {
  return Array.isArray(file) ? `${file.length} files (${file[0]} …)` : file;
}

function summaryText(x: SweepExtraction): string {
  const s = x.summary;
  const parts = [
    s.noResonance ? `${s.noResonance} without a resonance in the window` : '',
    s.lowSnr ? `${s.lowSnr} with too low SNR` : '',
    s.fitFailed ? `${s.fitFailed} where the fit failed` : '',
  ].filter(Boolean);
  return parts.join(', ') || 'no flags';
}
