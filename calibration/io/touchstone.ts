/**
 * Touchstone 1.x (.s1p/.s2p), following "Touchstone File Format Specification 1.1 (EIA/IBIS, 2002)":
 * case-insensitive; '!' starts a comment to end of line; the option line
 * `# <frequency unit> <parameter> <format> R <n>` is the first non-comment line, later option lines
 * are ignored; defaults GHz, S, MA, R 50; formats RI (real, imaginary), MA (magnitude, angle in
 * degrees), DB (20·log10|S|, angle in degrees); a 2-port data line holds
 * f S11 S21 S12 S22 (note the 21-before-12 order of version 1); 2-port files may end with noise
 * parameters, which begin where the frequency stops increasing. One file per bias point.
 * [from memory] the option fields may appear in any order; we accept any order.
 */
import type { SParam } from './columns';
import { formatValue } from './common';
import { IssueLog, runWithLog } from './issues';
import { MIN_TRACE_POINTS, geometryOfSParam } from './raw';
import { preflight } from './table';
import type { Geometry, RawSweepData, RawTrace } from './types';
import { biasQuantityOfKind, conversionFactor, normaliseUnit, toHzFactor, BIAS_UNITS_HINT, type NormalisedUnit } from './units';

export interface TouchstoneInput {
  name: string;
  text: string;
  /** Bias of this file, in `biasUnit`; when absent it is read from the file name. */
  bias?: number;
}

export interface TouchstoneSetOptions {
  /** Regular expression applied to the file name: group 1 = number ('p' may stand for the decimal point), optional group 2 = unit. */
  biasPattern?: RegExp | string;
  biasUnit?: string;
  port?: SParam;
  /** Override the geometry implied by the port (e.g. an S21 trace saved as .s1p). */
  geometry?: Geometry;
}

type Format = 'RI' | 'MA' | 'DB';
const PAIR_INDEX: Record<SParam, number> = { S11: 0, S21: 1, S12: 2, S22: 3 };
const PAIR_NAMES: SParam[] = ['S11', 'S21', 'S12', 'S22'];
const PART_NAMES: Record<Format, [string, string]> = { RI: ['real', 'imag'], MA: ['magnitude', 'angle'], DB: ['dB', 'angle'] };

export function portsFromName(name: string): number | null {
  const m = /\.s(\d+)p$/i.exec(name.trim());
  return m ? Number(m[1]) : null;
}

interface OneFile {
  freqHz: Float64Array;
  re: Float64Array;
  im: Float64Array;
  rows: [number, number];
  ports: number;
}

function readOption(tokens: string[], row: number, log: IssueLog): { scale: number; unit: string; format: Format } {
  let unit: string | null = null;
  let param: string | null = null;
  let format: Format | null = null;
  let r: number | null = null;
  for (let i = 0; i < tokens.length; i++) {
    const tok = tokens[i];
    const up = tok.toUpperCase();
    const dup = (what: string): void => log.error(row, null, `option line gives the ${what} twice ('${tok}')`);
    if (['HZ', 'KHZ', 'MHZ', 'GHZ'].includes(up)) {
      if (unit) dup('frequency unit');
      unit = normaliseUnit(up)!.unit;
    } else if (['S', 'Y', 'Z', 'H', 'G'].includes(up)) {
      if (param) dup('parameter');
      param = up;
    } else if (up === 'RI' || up === 'MA' || up === 'DB') {
      if (format) dup('format');
      format = up;
    } else if (up === 'R') {
      const v = Number(tokens[i + 1]);
      if (i + 1 >= tokens.length || !(v > 0) || !Number.isFinite(v)) {
        log.fatal(row, null, `option line: 'R' must be followed by the reference resistance in ohms, e.g. 'R 50'`);
      }
      r = v;
      i++;
    } else {
      log.fatal(row, null, `option line: '${tok}' is not a frequency unit (Hz, kHz, MHz, GHz), a parameter (S, Y, Z, H, G), a format (DB, MA, RI) or 'R <ohms>'; expected e.g. '# GHz S RI R 50'`);
    }
  }
  void r;
  if (param && param !== 'S') log.fatal(row, null, `option line: the file holds ${param}-parameters; only S-parameters are read`);
  return { scale: toHzFactor(unit ?? 'GHz'), unit: unit ?? 'GHz', format: format ?? 'MA' };
}

function readOneFile(name: string, raw: string, port: SParam | null, log: IssueLog, ports0: number | null): OneFile & { port: SParam } {
  const text = preflight(name, raw, log);
  let ports = ports0;
  if (ports !== null && ports > 2) log.fatal(null, null, `a ${ports}-port file; only 1- and 2-port Touchstone files (.s1p, .s2p) are read`);
  const errorsBefore = log.errorCount;
  let capacity = 16;
  for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) capacity++;
  const freq = new Float64Array(capacity);
  const re = new Float64Array(capacity);
  const im = new Float64Array(capacity);
  let n = 0;
  let firstRow = 0, lastRow = 0;
  let option: { scale: number; unit: string; format: Format } | null = null;
  let pair = -1;
  let chosen: SParam | null = port;
  let noiseFrom = 0;
  let pos = 0;
  let row = 0;
  let last = -Infinity;
  while (pos < text.length) {
    let end = text.indexOf('\n', pos);
    if (end === -1) end = text.length;
    row++;
    let line = text.slice(pos, end);
    pos = end + 1;
    const bang = line.indexOf('!');
    if (bang >= 0) line = line.slice(0, bang);
    const t = line.trim();
    if (t === '') continue;
    if (t[0] === '[') {
      log.fatal(row, null, `'${t.split(/\s/)[0]}' is a Touchstone 2 keyword; only version 1.x files are read (save as Touchstone 1.1)`);
    }
    if (t[0] === '#') {
      if (option) log.warn(row, null, 'a second option line is ignored (the first one applies)');
      else option = readOption(t.slice(1).trim().split(/\s+/).filter((s) => s !== ''), row, log);
      continue;
    }
    if (!option) log.fatal(row, null, "data before the option line; a Touchstone file starts with '# <frequency unit> <parameter> <format> R <n>', e.g. '# GHz S RI R 50'");
    if (noiseFrom) continue;
    const tokens = t.split(/\s+/);
    if (ports === null) {
      if (tokens.length === 3) ports = 1;
      else if (tokens.length === 9) ports = 2;
      else log.fatal(row, null, `${tokens.length} numbers on the first data line; a 1-port line holds 3 and a 2-port line 9`);
    }
    if (pair < 0) {
      chosen = chosen ?? (ports === 1 ? 'S11' : 'S21');
      if (ports === 1 && chosen !== 'S11') log.fatal(null, null, `a 1-port file holds only S11, not ${chosen}`);
      pair = PAIR_INDEX[chosen];
    }
    const expected = 1 + 2 * ports! * ports!;
    // Noise parameters (2-port only): 5 numbers, starting where the frequency no longer increases.
    if (ports === 2 && tokens.length === 5 && n > 0 && Number(tokens[0]) * option.scale <= last) {
      noiseFrom = row;
      log.warn(row, null, `noise parameters from row ${row} on are ignored`);
      continue;
    }
    if (tokens.length !== expected) {
      const odd = (tokens.length - 1) % 2 === 1 ? '; an odd count of values after the frequency cannot form complex pairs' : '';
      const what = ports === 1 ? 'a 1-port line holds 3 (frequency and S11 as a pair)' : 'a 2-port line holds 9 (frequency, then S11, S21, S12, S22 as pairs)';
      log.error(row, null, `${tokens.length} numbers on a data line; ${what}${odd}`);
      continue;
    }
    const parts = PART_NAMES[option.format];
    let bad = false;
    const vals = tokens.map((tok, k) => {
      const v = Number(tok);
      if (!Number.isFinite(v)) {
        const col = k === 0 ? 'frequency' : `${PAIR_NAMES[(k - 1) >> 1]} ${parts[(k - 1) & 1]}`;
        log.error(row, col, /^[+-]?(nan|inf|infinity)$/i.test(tok) ? `'${tok}' is not a finite number` : `'${tok}' is not a number`);
        bad = true;
      }
      return v;
    });
    if (bad) continue;
    const f = vals[0] * option.scale;
    if (!(f > 0)) {
      log.error(row, 'frequency', `frequency must be > 0, got ${tokens[0]}`);
      continue;
    }
    if (f <= last) {
      log.error(row, 'frequency', `frequency ${tokens[0]} ${option.unit} does not increase (previous data line: ${formatValue(last / option.scale, option.unit)}); Touchstone data must be in increasing frequency`);
      continue;
    }
    last = f;
    const a = vals[1 + 2 * pair], b = vals[2 + 2 * pair];
    let x: number, y: number;
    if (option.format === 'RI') {
      x = a;
      y = b;
    } else {
      const m = option.format === 'MA' ? a : Math.pow(10, a / 20);
      const ph = (b * Math.PI) / 180;
      x = m * Math.cos(ph);
      y = m * Math.sin(ph);
    }
    if (n === 0) firstRow = row;
    lastRow = row;
    freq[n] = f;
    re[n] = x;
    im[n] = y;
    n++;
  }
  if (!option) log.fatal(null, null, "no option line and no data; a Touchstone file starts with '# <frequency unit> <parameter> <format> R <n>'");
  if (n === 0 && log.errorCount === 0) log.fatal(null, null, 'the option line is not followed by any data lines');
  // Only when every line was read: a dropped bad line would otherwise be reported twice.
  if (n > 0 && n < MIN_TRACE_POINTS && log.errorCount === errorsBefore) log.error(firstRow, null, `rows ${firstRow}–${lastRow}: only ${n} frequency point${n === 1 ? '' : 's'}; at least ${MIN_TRACE_POINTS} are needed per trace`);
  return { freqHz: freq.slice(0, n), re: re.slice(0, n), im: im.slice(0, n), rows: [firstRow, lastRow], ports: ports ?? 0, port: chosen ?? 'S11' };
}

const DEFAULT_BIAS = /(?:^|[^0-9A-Za-z.])([+-]?(?:\d+(?:\.\d*|p\d+)?|\.\d+)(?:e[+-]?\d+)?)\s*(mA|uA|µA|μA|nA|pA|A|mV|uV|µV|μV|nV|V|Phi0)(?![A-Za-z])/gi;

function baseName(name: string): string {
  return name.replace(/^.*[\\/]/, '').replace(/\.s\d+p$/i, '');
}

function numberFromName(s: string): number {
  return Number(s.replace(/p/i, '.'));
}

/** Bias and its unit from a file name; null unit when the pattern captures none. */
export function biasFromName(name: string, pattern: RegExp | string | undefined, wantUnit: NormalisedUnit | null, log: IssueLog): { bias: number; unit: NormalisedUnit | null } {
  const base = baseName(name);
  if (pattern !== undefined) {
    const re = typeof pattern === 'string' ? new RegExp(pattern) : new RegExp(pattern.source, pattern.flags.replace('g', ''));
    const m = re.exec(base);
    if (!m || m[1] === undefined) log.fatal(null, null, `the bias pattern ${re} does not match the file name '${base}' (group 1 must capture the number)`);
    const v = numberFromName(m[1]);
    if (!Number.isFinite(v)) log.fatal(null, null, `the bias pattern captured '${m[1]}', which is not a number`);
    let unit: NormalisedUnit | null = null;
    if (m[2] !== undefined) {
      unit = normaliseUnit(m[2]);
      if (!unit) log.fatal(null, null, `the bias pattern captured the unit '${m[2]}', which is not known (expected ${BIAS_UNITS_HINT})`);
    }
    return { bias: v, unit };
  }
  const hits: { bias: number; unit: NormalisedUnit; text: string }[] = [];
  for (const m of base.matchAll(DEFAULT_BIAS)) {
    const unit = normaliseUnit(m[2]);
    const v = numberFromName(m[1]);
    if (unit && Number.isFinite(v)) hits.push({ bias: v, unit, text: `${m[1]}${m[2]}` });
  }
  const fitting = wantUnit ? hits.filter((h) => h.unit.kind === wantUnit.kind) : hits;
  if (fitting.length === 1) return fitting[0];
  if (fitting.length === 0) {
    return log.fatal(null, null, `cannot read a bias from the file name '${base}' (expected a number and unit in it, e.g. 'dev3_bias_-0.125mA.s2p'); pass the bias values or a bias pattern`);
  }
  return log.fatal(null, null, `the file name '${base}' holds several bias-like values (${fitting.map((h) => h.text).join(', ')}); pass a bias pattern or the bias unit`);
}

export function parseTouchstoneSet(files: TouchstoneInput[], opts: TouchstoneSetOptions = {}): RawSweepData {
  const first = files[0]?.name ?? '(no files)';
  const log = new IssueLog(first);
  return runWithLog(log, () => {
    if (files.length === 0) log.fatal(null, null, 'no Touchstone files given');
    let want: NormalisedUnit | null = null;
    if (opts.biasUnit !== undefined) {
      want = normaliseUnit(opts.biasUnit);
      if (!want) log.fatal(null, null, `unknown bias unit '${opts.biasUnit}' (expected ${BIAS_UNITS_HINT})`);
    }
    const portsSeen = new Set(files.map((f) => portsFromName(f.name)));
    if (!opts.port && portsSeen.has(1) && portsSeen.has(2)) log.fatal(null, null, 'the set mixes .s1p and .s2p files; pass the port (S11, S21, S12 or S22)');
    const read: { file: string; bias: number; unit: NormalisedUnit | null; data: OneFile & { port: SParam } }[] = [];
    for (const f of files) {
      const flog = log.forFile(f.name);
      const before = log.errorCount;
      let bias: number;
      let unit: NormalisedUnit | null;
      if (f.bias !== undefined) {
        if (!Number.isFinite(f.bias)) flog.fatal(null, null, `the bias given for this file is not a finite number (${f.bias})`);
        bias = f.bias;
        unit = want;
      } else ({ bias, unit } = biasFromName(f.name, opts.biasPattern, want, flog));
      const data = readOneFile(f.name, f.text, opts.port ?? null, flog, portsFromName(f.name));
      if (log.errorCount === before) read.push({ file: f.name, bias, unit, data });
    }
    log.throwIfErrors();
    const ports = new Set(read.map((r) => r.data.port));
    if (ports.size > 1) log.fatal(null, null, `the files hold different parameters (${[...ports].join(', ')}); pass the port`);
    const port = read[0].data.port;

    // One bias unit for the whole set: the requested one, else the first one found; convert the rest.
    const target = want ?? read.find((r) => r.unit)?.unit ?? null;
    if (!target) log.warn(null, null, "no bias unit found in the file names; biases are kept as numbers (unit 'a.u.')");
    const traces: (RawTrace & { index: number })[] = read.map((r, index) => {
      let bias = r.bias;
      if (target && r.unit && r.unit.unit !== target.unit) {
        if (r.unit.kind !== target.kind || (target.kind !== 'current' && target.kind !== 'voltage')) {
          log.forFile(r.file).fatal(null, null, `bias unit '${r.unit.unit}' cannot be converted to '${target.unit}' used by the other files`);
        }
        bias = r.bias * conversionFactor(r.unit.unit, target.unit);
      }
      return { bias, rows: r.data.rows, file: r.file, freqHz: r.data.freqHz, re: r.data.re, im: r.data.im, index };
    });
    // File names sort as text ('-0.1' after '0.2'), so order the traces by bias.
    traces.sort((a, b) => a.bias - b.bias || a.index - b.index);
    const unitName = target?.unit ?? 'a.u.';
    for (let i = 1; i < traces.length; i++) {
      if (traces[i].bias === traces[i - 1].bias) {
        log.forFile(traces[i].file).warn(null, null, `bias ${formatValue(traces[i].bias, unitName)} appears twice: files '${traces[i - 1].file}' and '${traces[i].file}'`);
      }
    }
    const geometry = opts.geometry ?? geometryOfSParam(port)!;
    return {
      kind: 'touchstone' as const,
      file: files.map((f) => f.name),
      biasUnit: unitName,
      biasQuantity: biasQuantityOfKind(target?.kind ?? null),
      geometry,
      sparam: port,
      traces: traces.map(({ index: _i, ...t }) => t),
      issues: log.warnings(),
      metadata: {},
    };
  });
}
