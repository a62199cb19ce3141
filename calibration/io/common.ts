/** Column selection and unit checks shared by the CSV readers. */
import { classifyHeader, describeColumns, type Column, type ColumnRole } from './columns';
import { IssueLog } from './issues';
import type { TableHead, MetaEntry } from './table';
import { BIAS_UNITS_HINT, biasQuantityOfKind, toHzFactor, type BiasQuantity } from './units';

export const ROLE_WORDS: Record<ColumnRole, string> = {
  bias: 'bias',
  frequency: 'frequency',
  probe_frequency: 'probe frequency',
  sigma: 'uncertainty',
  sigma_frequency: 'frequency uncertainty',
  sigma_phase: 'phase uncertainty',
  ql: 'loaded Q (Ql)',
  qc: 'coupling Q (Qc)',
  qi: 'internal Q (Qi)',
  re: 'real part',
  im: 'imaginary part',
  mag_db: 'magnitude in dB',
  mag_lin: 'linear magnitude',
  phase: 'phase',
};

export function classifyAll(head: TableHead): Column[] {
  return head.header.map((h, i) => classifyHeader(h, i));
}

/** The single column with this role, null if none; two or more is an ambiguity error. */
export function single(head: TableHead, cols: Column[], role: ColumnRole, log: IssueLog): Column | null {
  const hits = cols.filter((c) => c.role === role);
  if (hits.length > 1) {
    log.fatal(
      head.headerRow,
      null,
      `ambiguous columns: ${describeColumns(hits)} all look like the ${ROLE_WORDS[role]}; rename or remove all but one`,
    );
  }
  return hits[0] ?? null;
}

export function missing(head: TableHead, cols: Column[], what: string, example: string, log: IssueLog): never {
  const hints = cols.filter((c) => c.hint).map((c) => ` ('${c.header}': ${c.hint})`).join('');
  return log.fatal(head.headerRow, null, `no ${what} column; columns found: ${describeColumns(cols)}; expected e.g. ${example}${hints}`);
}

/** Warn about columns that play no part, so nothing is ignored silently. */
export function warnUnused(head: TableHead, cols: Column[], used: (Column | null)[], log: IssueLog): void {
  for (const c of cols) {
    if (used.includes(c) || c.header === '') continue;
    log.warn(head.headerRow, c.header, c.hint ? `column not used: ${c.hint}` : 'column not recognised and not used');
  }
}

export function biasUnitOf(head: TableHead, col: Column, log: IssueLog): { unit: string; quantity: BiasQuantity } {
  if (col.unitText === null) {
    log.warn(head.headerRow, col.header, "bias has no unit; values are kept as written (unit 'a.u.'), write e.g. 'bias [mA]'");
    return { unit: 'a.u.', quantity: col.nameQuantity ?? 'unknown' };
  }
  const u = col.unit;
  if (!u) log.fatal(head.headerRow, col.header, `unknown unit '${col.unitText}' (expected ${BIAS_UNITS_HINT})`);
  if (u.kind === 'current' || u.kind === 'voltage' || u.kind === 'flux' || u.kind === 'arbitrary') {
    const quantity = u.kind === 'flux' || u.kind === 'arbitrary' ? col.nameQuantity ?? 'unknown' : biasQuantityOfKind(u.kind);
    if (col.nameQuantity && (u.kind === 'current' || u.kind === 'voltage') && col.nameQuantity !== u.kind) {
      log.warn(head.headerRow, col.header, `the name says ${col.nameQuantity} but the unit '${u.unit}' is a ${u.kind}; using the unit`);
    }
    return { unit: u.unit, quantity };
  }
  return log.fatal(head.headerRow, col.header, `unit '${col.unitText}' is not a bias unit (expected ${BIAS_UNITS_HINT})`);
}

/**
 * Factor to Hz for a frequency-like column. Without a unit, values ≥ 1 MHz are taken as Hz (with a
 * warning); smaller values need a unit, since 6.1 could be GHz or a typo.
 */
export function hzFactorOf(head: TableHead, col: Column, sampleValue: number | null, log: IssueLog): number {
  if (col.unitText === null) {
    if (sampleValue !== null && Math.abs(sampleValue) >= 1e6) {
      log.warn(head.headerRow, col.header, "no unit; values ≥ 1 MHz taken as Hz, write e.g. 'frequency [Hz]'");
      return 1;
    }
    return log.fatal(head.headerRow, col.header, `no unit; write e.g. '${col.header} [GHz]' (Hz, kHz, MHz or GHz)`);
  }
  const u = col.unit;
  if (!u) return log.fatal(head.headerRow, col.header, `unknown unit '${col.unitText}' (expected Hz, kHz, MHz or GHz)`);
  if (u.kind !== 'frequency') return log.fatal(head.headerRow, col.header, `unit '${col.unitText}' is not a frequency (expected Hz, kHz, MHz or GHz)`);
  if (u.note) log.warn(head.headerRow, col.header, u.note);
  return toHzFactor(u.unit);
}

export function metadataRecord(meta: Map<string, MetaEntry>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of meta) out[k] = v.value;
  return out;
}

/** Median of the finite values in the first n entries (used only to judge a unitless column). */
export function medianAbs(values: ArrayLike<number>, n: number): number | null {
  const a: number[] = [];
  for (let i = 0; i < n && a.length < 1001; i++) if (Number.isFinite(values[i])) a.push(Math.abs(values[i]));
  if (a.length === 0) return null;
  a.sort((x, y) => x - y);
  return a[a.length >> 1];
}

export function formatValue(v: number, unit: string): string {
  return `${Number(v.toPrecision(10))} ${unit}`;
}

/**
 * Duplicate and direction checks on a sequence of bias values (one per point or per trace).
 * `label(i)` names where entry i came from, e.g. 'row 12' or 'rows 2–2002'.
 */
export function checkBiasSequence(
  bias: ArrayLike<number>,
  n: number,
  unit: string,
  label: (i: number) => string,
  rowOf: (i: number) => number | null,
  column: string | null,
  log: IssueLog,
): void {
  const seen = new Map<number, number>();
  let dupes = 0;
  for (let i = 0; i < n; i++) {
    const b = bias[i];
    const j = seen.get(b);
    if (j === undefined) seen.set(b, i);
    else {
      dupes++;
      if (dupes <= 10) log.warn(rowOf(i), column, `bias ${formatValue(b, unit)} appears twice: ${label(j)} and ${label(i)}`);
    }
  }
  if (dupes > 10) log.warn(null, column, `${dupes - 10} more duplicated bias values not listed`);
  let dir = 0;
  let reversals = 0;
  let firstAt = -1;
  for (let i = 1; i < n; i++) {
    const d = Math.sign(bias[i] - bias[i - 1]);
    if (d === 0) continue;
    if (dir !== 0 && d !== dir) {
      reversals++;
      if (firstAt < 0) firstAt = i;
    }
    dir = d;
  }
  if (reversals > 0) {
    log.warn(
      rowOf(firstAt),
      column,
      `bias is not monotonic: at ${label(firstAt)} (${formatValue(bias[firstAt], unit)}) the sweep turns back after ${formatValue(bias[firstAt - 1], unit)}` +
        (reversals > 1 ? ` (${reversals} turns in all)` : ''),
    );
  }
}
