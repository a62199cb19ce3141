/** Tuning points: one resonance frequency per bias, with optional uncertainty and quality factors. */
import type { Column } from './columns';
import { biasUnitOf, checkBiasSequence, classifyAll, hzFactorOf, medianAbs, metadataRecord, missing, single, warnUnused } from './common';
import { IssueLog, runWithLog } from './issues';
import { cellNumber, describeBadCell, forEachRow, readHead, type TableHead } from './table';
import type { TuningPoint, TuningPointsData } from './types';

const FREQ_EXAMPLE = "'frequency [GHz]' or 'f_r (Hz)'";
const BIAS_EXAMPLE = "'bias [mA]', 'coil current (uA)' or 'flux_bias_V'";

export function parseTuningPoints(file: string, text: string): TuningPointsData {
  const log = new IssueLog(file);
  return runWithLog(log, () => readTuning(readHead(file, text, log), log));
}

export function readTuning(head: TableHead, log: IssueLog): TuningPointsData {
  const cols = classifyAll(head);
  const biasCol = single(head, cols, 'bias', log) ?? missing(head, cols, 'bias', BIAS_EXAMPLE, log);
  const freqCol = single(head, cols, 'frequency', log) ?? missing(head, cols, 'resonance-frequency', FREQ_EXAMPLE, log);
  let sigmaCol = single(head, cols, 'sigma_frequency', log);
  const generic = single(head, cols, 'sigma', log);
  if (sigmaCol && generic) log.fatal(head.headerRow, null, `ambiguous columns: '${sigmaCol.header}' and '${generic.header}' both look like the frequency uncertainty`);
  sigmaCol = sigmaCol ?? generic;
  const qCols = (['ql', 'qc', 'qi'] as const).map((r) => single(head, cols, r, log));
  warnUnused(head, cols, [biasCol, freqCol, sigmaCol, ...qCols], log);
  const { unit: biasUnit, quantity: biasQuantity } = biasUnitOf(head, biasCol, log);

  // Read raw values first; unit factors are applied afterwards (a unitless column is judged by its values).
  const rows: number[] = [];
  const bias: number[] = [];
  const freq: number[] = [];
  const sigma: number[] = [];
  const q: number[][] = [[], [], []];
  const emptyOptional = new Map<Column, number[]>();
  const optional = (cell: string, col: Column, row: number, out: number[]): void => {
    const v = cellNumber(cell);
    if (Number.isFinite(v)) {
      if (v <= 0) log.error(row, col.header, `must be > 0, got ${cell.trim()}`);
      out.push(v);
      return;
    }
    const t = cell.trim();
    // An empty or 'nan' Q/uncertainty cell leaves that value out for this point only (reported below).
    if (t === '' || /^[+-]?nan$/i.test(t)) {
      const list = emptyOptional.get(col) ?? [];
      list.push(row);
      emptyOptional.set(col, list);
    } else log.error(row, col.header, describeBadCell(cell));
    out.push(NaN);
  };
  forEachRow(head, log, (cells, row) => {
    const b = cellNumber(cells[biasCol.index]);
    const f = cellNumber(cells[freqCol.index]);
    let ok = true;
    if (!Number.isFinite(b)) {
      log.error(row, biasCol.header, describeBadCell(cells[biasCol.index]));
      ok = false;
    }
    if (!Number.isFinite(f)) {
      log.error(row, freqCol.header, describeBadCell(cells[freqCol.index]));
      ok = false;
    } else if (f <= 0) {
      log.error(row, freqCol.header, `frequency must be > 0, got ${cells[freqCol.index].trim()}`);
      ok = false;
    }
    if (!ok) return;
    rows.push(row);
    bias.push(b);
    freq.push(f);
    if (sigmaCol) optional(cells[sigmaCol.index], sigmaCol, row, sigma);
    qCols.forEach((c, k) => {
      if (c) optional(cells[c.index], c, row, q[k]);
    });
  });
  if (rows.length === 0 && log.errorCount === 0) log.fatal(head.headerRow, null, 'the header is not followed by any data rows');
  for (const [col, list] of emptyOptional) {
    const shown = list.slice(0, 8).join(', ') + (list.length > 8 ? ', …' : '');
    log.warn(list[0], col.header, `${list.length} empty value${list.length === 1 ? '' : 's'} (row${list.length === 1 ? '' : 's'} ${shown}); those points have no ${col.header}`);
  }
  log.throwIfErrors();

  const fScale = hzFactorOf(head, freqCol, medianAbs(freq, freq.length), log);
  let sScale = fScale;
  if (sigmaCol) {
    if (sigmaCol.unitText === null) {
      log.warn(head.headerRow, sigmaCol.header, `no unit; taken in the unit of '${freqCol.header}'`);
    } else {
      sScale = hzFactorOf(head, sigmaCol, null, log);
    }
  }
  for (const c of qCols) {
    if (c && c.unitText !== null && c.unit?.kind !== 'linear') log.warn(head.headerRow, c.header, `a quality factor has no unit; '${c.unitText}' ignored`);
  }

  const points: TuningPoint[] = rows.map((row, i) => {
    const p: TuningPoint = { row, bias: bias[i], frHz: freq[i] * fScale };
    if (sigmaCol && Number.isFinite(sigma[i])) p.sigmaHz = sigma[i] * sScale;
    if (qCols[0] && Number.isFinite(q[0][i])) p.ql = q[0][i];
    if (qCols[1] && Number.isFinite(q[1][i])) p.qc = q[1][i];
    if (qCols[2] && Number.isFinite(q[2][i])) p.qi = q[2][i];
    return p;
  });
  checkBiasSequence(bias, bias.length, biasUnit, (i) => `row ${rows[i]}`, (i) => rows[i], biasCol.header, log);
  return {
    kind: 'tuning_points',
    file: head.file,
    biasUnit,
    biasQuantity,
    points,
    issues: log.warnings(),
    metadata: metadataRecord(head.metadata),
  };
}
