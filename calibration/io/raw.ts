/**
 * Raw complex sweeps in long form: one row per (bias, frequency) with the response as real/imag,
 * dB magnitude + phase, or linear magnitude + phase. Rows with equal consecutive bias form a trace.
 * Values live in Float64Arrays (no per-cell objects) so 50 MB files stay cheap.
 */
import type { Column, ColumnRole, SParam } from './columns';
import { biasUnitOf, checkBiasSequence, classifyAll, formatValue, hzFactorOf, medianAbs, metadataRecord, missing, single, warnUnused, ROLE_WORDS } from './common';
import { IssueLog, runWithLog } from './issues';
import { cellNumber, describeBadCell, forEachRow, metaLookup, readHead, type TableHead } from './table';
import type { Geometry, RawSweepData, RawTrace } from './types';
import { toRadFactor } from './units';

/** Fewer points cannot constrain a resonance fit (centre, width, depth, background, phase). Common practice. */
export const MIN_TRACE_POINTS = 20;

type RespRole = 're' | 'im' | 'mag_db' | 'mag_lin' | 'phase';
const RESP_ROLES: ColumnRole[] = ['re', 'im', 'mag_db', 'mag_lin', 'phase'];
type Group = Partial<Record<RespRole, Column>>;

export function geometryOfSParam(s: SParam | null): Geometry | null {
  if (s === 'S21' || s === 'S12') return 'notch';
  if (s === 'S11' || s === 'S22') return 'reflection';
  return null;
}

export function parseGeometryWord(word: string): Geometry | null {
  const w = word.trim().toLowerCase().replace(/[\s_-]+/g, ' ');
  if (['notch', 'hanger', 'side coupled', 'transmission', 's21', 'notch type'].includes(w)) return 'notch';
  if (['reflection', 'reflective', 'reflection type', 's11', 'direct reflection'].includes(w)) return 'reflection';
  return null;
}

function completeFormat(g: Group): 'ri' | 'db' | 'lin' | null {
  if (g.re && g.im) return 'ri';
  if (g.mag_db && g.phase) return 'db';
  if (g.mag_lin && g.phase) return 'lin';
  return null;
}

export function parseRawComplex(file: string, text: string, opts: { geometry?: Geometry } = {}): RawSweepData {
  const log = new IssueLog(file);
  return runWithLog(log, () => readRaw(readHead(file, text, log), log, opts));
}

export function readRaw(head: TableHead, log: IssueLog, opts: { geometry?: Geometry }): RawSweepData {
  const cols = classifyAll(head);
  const biasCol = single(head, cols, 'bias', log) ?? missing(head, cols, 'bias', "'bias [mA]'", log);
  const freqCol = single(head, cols, 'frequency', log) ?? missing(head, cols, 'frequency', "'frequency [GHz]'", log);

  // Response columns grouped by the S-parameter their names mention.
  const resp = cols.filter((c) => c.role !== null && RESP_ROLES.includes(c.role));
  const named = new Map<string, Group>();
  for (const c of resp) if (c.sparam) named.set(c.sparam, named.get(c.sparam) ?? {});
  const unnamed = resp.filter((c) => !c.sparam);
  if (named.size > 1 && unnamed.length > 0) {
    log.fatal(head.headerRow, unnamed[0].header, `does not say which S-parameter it belongs to, and the file holds ${[...named.keys()].join(' and ')}`);
  }
  if (named.size === 0) named.set('', {});
  for (const c of resp) {
    const key = c.sparam ?? [...named.keys()][0];
    const g = named.get(key)!;
    const role = c.role as RespRole;
    if (g[role]) log.fatal(head.headerRow, null, `ambiguous columns: '${g[role]!.header}' and '${c.header}' both look like the ${ROLE_WORDS[role]}${key ? ` of ${key}` : ''}`);
    g[role] = c;
  }

  const meta = metaLookup(head.metadata, 'geometry', 'measurement', 'configuration');
  let metaGeometry: Geometry | null = null;
  if (meta) {
    metaGeometry = parseGeometryWord(meta.value);
    if (!metaGeometry) log.fatal(meta.row, null, `comment '${meta.key} = ${meta.value}': expected notch or reflection`);
  }
  const complete = [...named.entries()].filter(([, g]) => completeFormat(g) !== null);
  let chosen: [string, Group] | undefined;
  if (complete.length > 1) {
    const want = opts.geometry ?? metaGeometry;
    const fits = complete.filter(([k]) => geometryOfSParam(k as SParam) === want);
    if (!want || fits.length !== 1) {
      log.fatal(head.headerRow, null, `the file holds ${complete.map(([k]) => k).join(' and ')}; choose one with the geometry option (notch → S21, reflection → S11)`);
    }
    chosen = fits[0];
  } else chosen = complete[0];
  if (!chosen) {
    const g = [...named.values()][0];
    const have = Object.values(g).map((c) => `'${c!.header}'`);
    let need = "real and imaginary ('S21 real', 'S21 imag'), dB magnitude and phase ('S21 [dB]', 'phase [deg]'), or linear magnitude and phase ('|S21|', 'phase [rad]')";
    if (g.re && !g.im) need = `an imaginary-part column to go with '${g.re.header}'`;
    else if (g.im && !g.re) need = `a real-part column to go with '${g.im.header}'`;
    else if ((g.mag_db || g.mag_lin) && !g.phase) need = `a phase column to go with '${(g.mag_db ?? g.mag_lin)!.header}', e.g. 'phase [deg]'`;
    else if (g.phase && !g.mag_db && !g.mag_lin) need = `a magnitude column to go with '${g.phase.header}', e.g. 'S21 [dB]' or '|S21|'`;
    const hints = cols.filter((c) => c.hint).map((c) => ` ('${c.header}': ${c.hint})`).join('');
    log.fatal(head.headerRow, null, `no complete response: need ${need}; columns found: ${cols.map((c) => `'${c.header}'`).join(', ')}${have.length ? '' : ''}${hints}`);
  }
  const [sparamKey, group] = chosen;
  const format = completeFormat(group)!;
  const sparam = (sparamKey || null) as SParam | null;
  const [colA, colB] = format === 'ri' ? [group.re!, group.im!] : format === 'db' ? [group.mag_db!, group.phase!] : [group.mag_lin!, group.phase!];
  const used = [biasCol, freqCol, colA, colB];
  const spare = resp.filter((c) => !used.includes(c));
  for (const c of spare) log.warn(head.headerRow, c.header, `not used: the response is read from '${colA.header}' and '${colB.header}'`);
  warnUnused(head, cols, [...used, ...spare], log);

  let geometry: Geometry;
  const colGeometry = geometryOfSParam(sparam);
  if (opts.geometry) geometry = opts.geometry;
  else if (metaGeometry) geometry = metaGeometry;
  else if (colGeometry) geometry = colGeometry;
  else {
    return log.fatal(head.headerRow, null, "cannot tell the geometry: name the response columns after S21 (notch) or S11 (reflection), add a comment '# geometry = notch', or pass the geometry option");
  }
  if (colGeometry && colGeometry !== geometry) {
    log.warn(head.headerRow, colA.header, `the columns hold ${sparam} (${colGeometry}) but the geometry is set to ${geometry}`);
  }
  if (metaGeometry && opts.geometry && metaGeometry !== opts.geometry) {
    log.warn(meta!.row, null, `comment says geometry = ${metaGeometry}; the option ${opts.geometry} wins`);
  }

  const { unit: biasUnit, quantity: biasQuantity } = biasUnitOf(head, biasCol, log);
  // Units of the response columns.
  let phaseScale = 1;
  if (format !== 'ri') {
    if (colB.unitText === null) log.fatal(head.headerRow, colB.header, `no unit; write '${colB.header} [deg]' or '${colB.header} [rad]'`);
    if (colB.unit?.kind !== 'angle') log.fatal(head.headerRow, colB.header, `unit '${colB.unitText}' is not an angle (expected deg or rad)`);
    phaseScale = toRadFactor(colB.unit.unit);
  } else {
    for (const c of [colA, colB]) {
      const k = c.unit?.kind;
      if (c.unitText !== null && (k === 'angle' || k === 'decibel' || k === 'power' || k === 'frequency')) {
        log.fatal(head.headerRow, c.header, `unit '${c.unitText}' does not fit a real/imaginary part (expected none, 'lin' or a voltage)`);
      }
    }
  }
  if (format === 'lin' && colA.unitText !== null && colA.unit?.kind !== 'linear' && colA.unit?.kind !== 'voltage' && colA.unit?.kind !== 'arbitrary') {
    log.fatal(head.headerRow, colA.header, `unit '${colA.unitText}' does not fit a linear magnitude (use '[dB]' for decibels)`);
  }

  // Read into preallocated typed arrays.
  const cap = head.lineCount;
  const bias = new Float64Array(cap);
  const freq = new Float64Array(cap);
  const va = new Float64Array(cap);
  const vb = new Float64Array(cap);
  const rowOf = new Int32Array(cap);
  let n = 0;
  const ib = biasCol.index, jf = freqCol.index, ja = colA.index, jb = colB.index;
  forEachRow(head, log, (cells, row) => {
    const b = cellNumber(cells[ib]);
    const f = cellNumber(cells[jf]);
    const a = cellNumber(cells[ja]);
    const c = cellNumber(cells[jb]);
    // NaN fails every comparison, so one test per value catches empty/text/Inf cells.
    if (b === b && f === f && a === a && c === c && f > 0) {
      bias[n] = b;
      freq[n] = f;
      va[n] = a;
      vb[n] = c;
      rowOf[n] = row;
      n++;
      return;
    }
    if (b !== b) log.error(row, biasCol.header, describeBadCell(cells[ib]));
    if (f !== f) log.error(row, freqCol.header, describeBadCell(cells[jf]));
    else if (!(f > 0)) log.error(row, freqCol.header, `frequency must be > 0, got ${cells[jf].trim()}`);
    if (a !== a) log.error(row, colA.header, describeBadCell(cells[ja]));
    if (c !== c) log.error(row, colB.header, describeBadCell(cells[jb]));
  });
  if (n === 0 && log.errorCount === 0) log.fatal(head.headerRow, null, 'the header is not followed by any data rows');
  log.throwIfErrors();

  const fScale = hzFactorOf(head, freqCol, medianAbs(freq, n), log);
  // Frequencies in messages are shown in the column's own unit, as the user sees them in the file.
  const fUnit = freqCol.unit?.kind === 'frequency' ? freqCol.unit.unit : 'Hz';
  const showF = (hz: number): string => formatValue(hz / fScale, fUnit);
  // Convert to real/imaginary in place (definitions: |S| = 10^(dB/20); S = |S|·e^{iφ}).
  if (fScale !== 1) for (let i = 0; i < n; i++) freq[i] *= fScale;
  if (format === 'db' || format === 'lin') {
    const k = Math.LN10 / 20;
    for (let i = 0; i < n; i++) {
      const m = format === 'db' ? Math.exp(va[i] * k) : va[i];
      const ph = vb[i] * phaseScale;
      va[i] = m * Math.cos(ph);
      vb[i] = m * Math.sin(ph);
    }
  }

  // Traces: runs of equal bias.
  const starts: number[] = [];
  for (let i = 0; i < n; i++) if (i === 0 || bias[i] !== bias[i - 1]) starts.push(i);
  starts.push(n);
  const nTraces = starts.length - 1;
  if (nTraces > 2 && nTraces * 2 > n) {
    const distinct = new Set<number>();
    for (let t = 0; t < nTraces; t++) distinct.add(bias[starts[t]]);
    if (distinct.size < nTraces) {
      log.fatal(rowOf[1], biasCol.header, `the bias changes on almost every row and repeats later (${nTraces} runs, ${distinct.size} distinct values): the rows look ordered by frequency first; sort them by bias, then frequency, so each trace is one block of rows`);
    }
  }
  const traces: RawTrace[] = [];
  const reversed: string[] = [];
  for (let t = 0; t < nTraces; t++) {
    const s = starts[t], e = starts[t + 1], len = e - s;
    const rows: [number, number] = [rowOf[s], rowOf[e - 1]];
    const b = bias[s];
    if (len < MIN_TRACE_POINTS) {
      log.error(rows[0], biasCol.header, `rows ${rows[0]}–${rows[1]}: the trace at bias ${formatValue(b, biasUnit)} has only ${len} point${len === 1 ? '' : 's'}; at least ${MIN_TRACE_POINTS} are needed per trace`);
      continue;
    }
    const dir = Math.sign(freq[s + 1] - freq[s]);
    let bad = -1;
    for (let i = s + 1; i < e; i++) {
      if (Math.sign(freq[i] - freq[i - 1]) !== dir || dir === 0) {
        bad = i;
        break;
      }
    }
    if (bad >= 0) {
      const same = freq[bad] === freq[bad - 1];
      log.error(
        rowOf[bad],
        freqCol.header,
        same
          ? `frequency ${showF(freq[bad])} repeats row ${rowOf[bad - 1]} in the trace at bias ${formatValue(b, biasUnit)} (rows ${rows[0]}–${rows[1]})`
          : `frequency ${showF(freq[bad])} breaks the order of the trace at bias ${formatValue(b, biasUnit)} (rows ${rows[0]}–${rows[1]}, previous row ${rowOf[bad - 1]}: ${showF(freq[bad - 1])}); sort each trace by frequency`,
      );
      continue;
    }
    const fr = freq.subarray(s, e), re = va.subarray(s, e), im = vb.subarray(s, e);
    if (dir < 0) {
      fr.reverse();
      re.reverse();
      im.reverse();
      reversed.push(`${rows[0]}–${rows[1]}`);
    }
    traces.push({ bias: b, rows, file: head.file, freqHz: fr, re, im });
  }
  log.throwIfErrors();
  if (reversed.length > 0) {
    const shown = reversed.slice(0, 5).join(', ') + (reversed.length > 5 ? ', …' : '');
    log.warn(traces.find((t) => `${t.rows[0]}–${t.rows[1]}` === reversed[0])!.rows[0], freqCol.header, `frequencies decrease in ${reversed.length} trace${reversed.length === 1 ? '' : 's'} (rows ${shown}); reversed to increasing order`);
  }
  checkBiasSequence(
    traces.map((t) => t.bias),
    traces.length,
    biasUnit,
    (i) => `rows ${traces[i].rows[0]}–${traces[i].rows[1]}`,
    (i) => traces[i].rows[0],
    biasCol.header,
    log,
  );
  return {
    kind: 'raw_complex',
    file: head.file,
    biasUnit,
    biasQuantity,
    geometry,
    sparam,
    traces,
    issues: log.warnings(),
    metadata: metadataRecord(head.metadata),
  };
}
