/**
 * `fit FILE [FILE …]`: parse a sweep, fit the SQUID-terminated line model, print the calibration.
 * With --json the output is exactly the calibration JSON of calibration/contract.ts.
 */
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { basename, join } from 'node:path';
import { parseArgs } from 'node:util';
import type { CalibrationJson, InputKind } from '../contract';
import type { Loss } from '../fit/types';
import { SweepParseError } from '../io';
import { calibrateFiles, CalibrationRequestError, type SweepFile } from '../pipeline';
import { TuningInputError } from '../tuning/common';

export interface CommandOutput {
  stdout: string;
  stderr?: string;
  exitCode: number;
}

const KINDS: InputKind[] = ['tuning_points', 'raw_complex', 'touchstone', 'phase_flux'];
const LOSSES: Loss[] = ['linear', 'soft_l1', 'huber', 'cauchy'];

export const FIT_USAGE = `usage: cli fit FILE [FILE …|DIR] [--model exact|approx] [--z0 OHMS] [--json]
  [--kind tuning_points|raw_complex|touchstone|phase_flux] [--geometry notch|reflection]
  [--probe-frequency HZ] [--symmetric] [--loop-inductance H] [--loss soft_l1|huber|cauchy|linear]
  [--bias-pattern REGEX] [--bias-unit UNIT] [--cable-delay S] [--phase-velocity M_PER_S]`;

class UsageError extends Error {}

function positiveNumber(name: string, raw: string | undefined): number | null {
  if (raw === undefined) return null;
  const v = Number(raw);
  if (!Number.isFinite(v) || v <= 0) throw new UsageError(`--${name}: '${raw}' is not a positive number`);
  return v;
}

function oneOf<T extends string>(name: string, raw: string | undefined, allowed: readonly T[]): T | undefined {
  if (raw === undefined) return undefined;
  if (!allowed.includes(raw as T)) throw new UsageError(`--${name}: '${raw}' is not one of ${allowed.join(', ')}`);
  return raw as T;
}

/** A directory stands for the Touchstone files in it. */
function readInputs(paths: string[]): SweepFile[] {
  const files: SweepFile[] = [];
  for (const p of paths) {
    let st;
    try {
      st = statSync(p);
    } catch {
      throw new UsageError(`${p}: no such file`);
    }
    if (st.isDirectory()) {
      const names = readdirSync(p).filter((n) => /\.s\d+p$/i.test(n)).sort();
      if (names.length === 0) throw new UsageError(`${p}: the folder holds no Touchstone (.sNp) files`);
      for (const n of names) files.push({ name: n, text: readFileSync(join(p, n), 'utf8') });
    } else {
      files.push({ name: basename(p), text: readFileSync(p, 'utf8') });
    }
  }
  return files;
}

/** node:util parseArgs reads `--opt -5` as two options; lab scripts pass negative values that way. */
function joinNegativeValues(argv: string[], valued: Set<string>): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const next = argv[i + 1];
    if (a.startsWith('--') && valued.has(a.slice(2)) && next !== undefined && /^-(\d|\.\d)/.test(next)) {
      out.push(`${a}=${next}`);
      i++;
    } else out.push(a);
  }
  return out;
}

const VALUED = new Set(['model', 'z0', 'kind', 'geometry', 'probe-frequency', 'loop-inductance', 'loss', 'bias-pattern', 'bias-unit', 'cable-delay', 'phase-velocity']);

export function runFit(argv: string[]): CommandOutput {
  let parsed;
  try {
    parsed = parseArgs({
      args: joinNegativeValues(argv, VALUED),
      allowPositionals: true,
      options: {
        model: { type: 'string' },
        z0: { type: 'string' },
        json: { type: 'boolean', default: false },
        kind: { type: 'string' },
        geometry: { type: 'string' },
        'probe-frequency': { type: 'string' },
        symmetric: { type: 'boolean', default: false },
        'loop-inductance': { type: 'string' },
        loss: { type: 'string' },
        'bias-pattern': { type: 'string' },
        'bias-unit': { type: 'string' },
        'cable-delay': { type: 'string' },
        'phase-velocity': { type: 'string' },
      },
    });
  } catch (e) {
    return { stdout: '', stderr: `${(e as Error).message}\n${FIT_USAGE}\n`, exitCode: 2 };
  }
  const v = parsed.values;
  try {
    if (parsed.positionals.length === 0) throw new UsageError('fit needs a sweep file');
    const files = readInputs(parsed.positionals);
    const cableDelay = v['cable-delay'] === undefined ? undefined : Number(v['cable-delay']);
    if (cableDelay !== undefined && !Number.isFinite(cableDelay)) throw new UsageError(`--cable-delay: '${v['cable-delay']}' is not a number`);
    const result = calibrateFiles(files, {
      model: oneOf('model', v.model, ['exact', 'approx'] as const),
      kind: oneOf('kind', v.kind, KINDS),
      geometry: oneOf('geometry', v.geometry, ['notch', 'reflection'] as const),
      z0Ohm: positiveNumber('z0', v.z0),
      probeFrequencyHz: positiveNumber('probe-frequency', v['probe-frequency']),
      symmetric: v.symmetric,
      loopInductanceH: positiveNumber('loop-inductance', v['loop-inductance']),
      loss: oneOf('loss', v.loss, LOSSES),
      biasPattern: v['bias-pattern'],
      biasUnit: v['bias-unit'],
      delayS: cableDelay,
      phaseVelocityMps: positiveNumber('phase-velocity', v['phase-velocity']),
    });
    const stdout = v.json ? JSON.stringify(result) + '\n' : formatCalibration(result);
    // A fit that did not converge is still printed (it is a result), but scripts see exit code 3.
    return { stdout, exitCode: result.success ? 0 : 3 };
  } catch (e) {
    if (e instanceof UsageError) return { stdout: '', stderr: `${e.message}\n${FIT_USAGE}\n`, exitCode: 2 };
    if (e instanceof SweepParseError) {
      const lines = e.issues.filter((i) => i.severity === 'error').map((i) => i.message);
      return { stdout: '', stderr: (lines.length ? lines : [e.message]).join('\n') + '\n', exitCode: 1 };
    }
    if (e instanceof CalibrationRequestError || e instanceof TuningInputError) {
      return { stdout: '', stderr: e.message + '\n', exitCode: 1 };
    }
    throw e;
  }
}

function fmt(x: number | null | undefined, digits = 6): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return x.toPrecision(digits);
}

/** Readable summary for people at a terminal. */
export function formatCalibration(c: CalibrationJson): string {
  const out: string[] = [];
  out.push(`model ${c.model} (${c.kind}), bias unit ${c.bias_unit || '—'}, ${c.ndata} points, loss ${c.loss}`);
  out.push(`${c.success ? 'converged' : 'NOT converged'}: ${c.message}`);
  out.push('');
  for (const [name, p] of Object.entries(c.params)) {
    const err = p.stderr === null ? (p.vary === false ? 'fixed' : 'n/a') : `± ${fmt(p.stderr, 3)}`;
    out.push(`  ${name.padEnd(14)} ${fmt(p.value, 9).padStart(16)}  ${err}`);
  }
  out.push('');
  out.push(`  reduced chi-square ${fmt(c.redchi, 4)}   AIC ${fmt(c.aic, 6)}   BIC ${fmt(c.bic, 6)}`);
  if (c.outliers.length) out.push(`  outliers (point index): ${c.outliers.join(', ')}`);
  if (c.traces) {
    const flagged = c.traces.filter((t) => t.flag !== null).length;
    out.push(`  traces: ${c.traces.length}, flagged ${flagged}`);
  }
  for (const w of c.warnings) out.push(`warning: ${w}`);
  return out.join('\n') + '\n';
}
