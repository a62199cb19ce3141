/** Reflected phase versus bias at one probe frequency (non-resonant SQUID termination). */
import type { Column } from './columns';
import { biasUnitOf, checkBiasSequence, classifyAll, hzFactorOf, metadataRecord, missing, single, warnUnused } from './common';
import { IssueLog, runWithLog } from './issues';
import { cellNumber, describeBadCell, forEachRow, metaLookup, readHead, type TableHead } from './table';
import type { PhaseFluxData, PhasePoint } from './types';
import { parseFrequencyValue, toRadFactor } from './units';

export const PROBE_META_KEYS = ['probe_frequency', 'probe_freq', 'f_probe', 'fprobe', 'probe_f', 'probe'];

export function parsePhaseFlux(file: string, text: string, opts: { probeFrequencyHz?: number } = {}): PhaseFluxData {
  const log = new IssueLog(file);
  return runWithLog(log, () => readPhaseFlux(readHead(file, text, log), log, opts));
}

function angleFactor(head: TableHead, col: Column, log: IssueLog, fallback?: number): number {
  if (col.unitText === null) {
    if (fallback !== undefined) {
      log.warn(head.headerRow, col.header, 'no unit; taken in the unit of the phase column');
      return fallback;
    }
    return log.fatal(head.headerRow, col.header, `no unit; write '${col.header} [deg]' or '${col.header} [rad]'`);
  }
  if (col.unit?.kind !== 'angle') return log.fatal(head.headerRow, col.header, `unit '${col.unitText}' is not an angle (expected deg or rad)`);
  return toRadFactor(col.unit.unit);
}

export function readPhaseFlux(head: TableHead, log: IssueLog, opts: { probeFrequencyHz?: number }): PhaseFluxData {
  const cols = classifyAll(head);
  const biasCol = single(head, cols, 'bias', log) ?? missing(head, cols, 'bias', "'bias [mA]'", log);
  const phaseCol = single(head, cols, 'phase', log) ?? missing(head, cols, 'phase', "'phase [deg]' or 'phase [rad]'", log);
  let sigmaCol = single(head, cols, 'sigma_phase', log);
  const generic = single(head, cols, 'sigma', log);
  if (sigmaCol && generic) log.fatal(head.headerRow, null, `ambiguous columns: '${sigmaCol.header}' and '${generic.header}' both look like the phase uncertainty`);
  sigmaCol = sigmaCol ?? generic;
  // A frequency column in a phase file is the probe frequency; it must not change from row to row.
  const probeCol = single(head, cols, 'probe_frequency', log) ?? single(head, cols, 'frequency', log);
  const mags = cols.filter((c) => c.role === 'mag_db' || c.role === 'mag_lin' || c.role === 're' || c.role === 'im');
  warnUnused(head, cols, [biasCol, phaseCol, sigmaCol, probeCol, ...mags], log);
  for (const m of mags) log.warn(head.headerRow, m.header, 'magnitude/complex column not used: phase-versus-flux input reads only the phase');
  const { unit: biasUnit, quantity: biasQuantity } = biasUnitOf(head, biasCol, log);
  const pScale = angleFactor(head, phaseCol, log);
  const sScale = sigmaCol ? angleFactor(head, sigmaCol, log, pScale) : 1;

  const points: PhasePoint[] = [];
  const bias: number[] = [];
  let probeRaw: number | null = null;
  let probeRow = 0;
  forEachRow(head, log, (cells, row) => {
    const b = cellNumber(cells[biasCol.index]);
    const p = cellNumber(cells[phaseCol.index]);
    let ok = true;
    if (!Number.isFinite(b)) {
      log.error(row, biasCol.header, describeBadCell(cells[biasCol.index]));
      ok = false;
    }
    if (!Number.isFinite(p)) {
      log.error(row, phaseCol.header, describeBadCell(cells[phaseCol.index]));
      ok = false;
    }
    let s: number | undefined;
    if (sigmaCol) {
      s = cellNumber(cells[sigmaCol.index]);
      if (!Number.isFinite(s)) {
        log.error(row, sigmaCol.header, describeBadCell(cells[sigmaCol.index]));
        ok = false;
      } else if (s <= 0) {
        log.error(row, sigmaCol.header, `uncertainty must be > 0, got ${cells[sigmaCol.index].trim()}`);
        ok = false;
      }
    }
    if (probeCol) {
      const f = cellNumber(cells[probeCol.index]);
      if (!Number.isFinite(f)) log.error(row, probeCol.header, describeBadCell(cells[probeCol.index]));
      else if (probeRaw === null) {
        probeRaw = f;
        probeRow = row;
      } else if (Math.abs(f - probeRaw) > 1e-9 * Math.abs(probeRaw)) {
        log.fatal(
          row,
          probeCol.header,
          `the probe frequency changes (${f} here, ${probeRaw} in row ${probeRow}); a phase-versus-flux file has one probe frequency (a raw sweep also needs magnitude columns)`,
        );
      }
    }
    if (!ok) return;
    const pt: PhasePoint = { row, bias: b, phaseRad: p * pScale };
    if (s !== undefined) pt.sigmaRad = s * sScale;
    points.push(pt);
    bias.push(b);
  });
  if (points.length === 0 && log.errorCount === 0) log.fatal(head.headerRow, null, 'the header is not followed by any data rows');
  log.throwIfErrors();

  // Probe frequency: caller option, then '# probe_frequency = …' comment, then a column.
  let probeFrequencyHz: number | null = null;
  let probeFrequencySource: PhaseFluxData['probeFrequencySource'] = null;
  const meta = metaLookup(head.metadata, ...PROBE_META_KEYS);
  let metaHz: number | null = null;
  if (meta) {
    const r = parseFrequencyValue(meta.value);
    if ('problem' in r) log.fatal(meta.row, null, `comment '${meta.key}': ${r.problem}`);
    else metaHz = r.hz;
  }
  let colHz: number | null = null;
  if (probeCol && probeRaw !== null) {
    const raw: number = probeRaw;
    colHz = raw * hzFactorOf(head, probeCol, raw, log);
    if (!(colHz > 0)) log.fatal(probeRow, probeCol.header, `probe frequency must be > 0, got ${raw}`);
  }
  if (opts.probeFrequencyHz !== undefined) {
    if (!(opts.probeFrequencyHz > 0) || !Number.isFinite(opts.probeFrequencyHz)) log.fatal(null, null, `probe frequency option must be a positive number of Hz, got ${opts.probeFrequencyHz}`);
    probeFrequencyHz = opts.probeFrequencyHz;
    probeFrequencySource = 'option';
  } else if (metaHz !== null) {
    probeFrequencyHz = metaHz;
    probeFrequencySource = 'comment';
  } else if (colHz !== null) {
    probeFrequencyHz = colHz;
    probeFrequencySource = 'column';
  }
  for (const [other, where] of [
    [metaHz, `comment row ${meta?.row}`],
    [colHz, `column '${probeCol?.header}'`],
  ] as const) {
    if (other !== null && probeFrequencyHz !== null && Math.abs(other - probeFrequencyHz) > 1e-9 * probeFrequencyHz) {
      log.warn(null, null, `probe frequency ${probeFrequencyHz} Hz (from ${probeFrequencySource}) differs from ${other} Hz in ${where}; using the former`);
    }
  }
  checkBiasSequence(bias, bias.length, biasUnit, (i) => `row ${points[i].row}`, (i) => points[i].row, biasCol.header, log);
  return {
    kind: 'phase_flux',
    file: head.file,
    biasUnit,
    biasQuantity,
    probeFrequencyHz,
    probeFrequencySource,
    points,
    issues: log.warnings(),
    metadata: metadataRecord(head.metadata),
  };
}
