/** Which reader a file needs, from its extension and header. */
import { classifyAll, single } from './common';
import { IssueLog, runWithLog } from './issues';
import { parsePhaseFlux, readPhaseFlux } from './phase';
import { readRaw } from './raw';
import Papa from 'papaparse';
import { cellNumber, readHead, type TableHead } from './table';
import { parseTouchstoneSet, portsFromName } from './touchstone';
import { readTuning } from './tuning';
import type { InputKind, ParseOptions, SweepData } from './types';

const OPTION_LINE = /^#\s*(?:(?:hz|khz|mhz|ghz|s|y|z|h|g|db|ma|ri|r\s+[\d.eE+-]+)\s*)+$/i;

function looksLikeTouchstone(text: string): boolean {
  for (const line of text.slice(0, 20000).split(/\r?\n/)) {
    const t = line.replace(/!.*/, '').trim();
    if (t === '') continue;
    return OPTION_LINE.test(t);
  }
  return false;
}

function frequencyVaries(head: TableHead, index: number): boolean {
  const sample = Papa.parse<string[]>(head.text.slice(head.bodyStart, head.bodyStart + 20000), { delimiter: head.delimiter, preview: 50 });
  const values = new Set<number>();
  for (const cells of sample.data.slice(head.headerFromComment ? 0 : 1)) {
    const v = cellNumber(cells[index] ?? '');
    if (Number.isFinite(v)) values.add(v);
  }
  return values.size > 1;
}

function kindFromHead(head: TableHead, log: IssueLog): InputKind {
  const cols = classifyAll(head);
  const has = (r: string): boolean => cols.some((c) => c.role === r);
  const complex = (has('re') && has('im')) || has('mag_db') || has('mag_lin');
  if (has('frequency') && (complex || (has('re') || has('im')))) return 'raw_complex';
  if (has('phase') && !complex) {
    // Phase with a frequency that changes row to row is a raw sweep missing its magnitude (the raw
    // reader says so); a constant one is the probe frequency of a phase-versus-flux file.
    const f = cols.find((c) => c.role === 'frequency');
    return f && frequencyVaries(head, f.index) ? 'raw_complex' : 'phase_flux';
  }
  if (has('bias') && has('frequency')) return 'tuning_points';
  single(head, cols, 'bias', log); // reports an ambiguous bias before the generic message
  return log.fatal(
    head.headerRow,
    null,
    `cannot tell what this file holds; columns found: ${cols.map((c) => `'${c.header}'`).join(', ')}. Expected bias + resonance frequency (tuning points), bias + frequency + S21/S11 columns (raw sweep) or bias + phase (phase versus flux)`,
  );
}

export function detectKind(fileName: string, text: string): InputKind {
  if (portsFromName(fileName) !== null) return 'touchstone';
  const log = new IssueLog(fileName);
  return runWithLog(log, () => {
    const head = readHead(fileName, text, log);
    if (looksLikeTouchstone(head.text)) return 'touchstone';
    return kindFromHead(head, log);
  });
}

export function parseSweepText(fileName: string, text: string, opts: ParseOptions = {}): SweepData {
  let kind = opts.kind;
  if (!kind) kind = detectKind(fileName, text);
  if (kind === 'touchstone') {
    const ports = portsFromName(fileName);
    const port = opts.geometry === 'reflection' ? 'S11' : opts.geometry === 'notch' && ports !== 1 ? 'S21' : undefined;
    return parseTouchstoneSet([{ name: fileName, text }], { port, geometry: opts.geometry });
  }
  if (kind === 'phase_flux') return parsePhaseFlux(fileName, text, opts);
  const log = new IssueLog(fileName);
  return runWithLog(log, () => {
    const head = readHead(fileName, text, log);
    return kind === 'raw_complex' ? readRaw(head, log, opts) : readTuning(head, log);
  });
}

export { readPhaseFlux };
