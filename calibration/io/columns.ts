/**
 * What each header cell means. Names are matched after folding case and separators, so
 * `Coil_Current (uA)`, `coil current [µA]` and `coil-current_uA` are the same column.
 */
import { normaliseUnit, parseUnitHeader, type NormalisedUnit } from './units';

export type ColumnRole =
  | 'bias'
  | 'frequency'
  | 'probe_frequency'
  | 'sigma' // uncertainty of unstated quantity: of the frequency (tuning) or of the phase (phase-flux)
  | 'sigma_frequency'
  | 'sigma_phase'
  | 'ql'
  | 'qc'
  | 'qi'
  | 're'
  | 'im'
  | 'mag_db'
  | 'mag_lin'
  | 'phase';

export type SParam = 'S11' | 'S21' | 'S12' | 'S22';

export interface Column {
  index: number;
  /** Header text as written (trimmed). */
  header: string;
  quantity: string;
  /** Unit text as written, null when the header carries none. */
  unitText: string | null;
  /** Canonical unit, null when none was written or the spelling is unknown (see unitText). */
  unit: NormalisedUnit | null;
  role: ColumnRole | null;
  sparam: SParam | null;
  /** Bias quantity implied by the name (current/coil/I vs voltage/V). */
  nameQuantity: 'current' | 'voltage' | null;
  /** Why a column was not recognised, when there is something useful to say. */
  hint?: string;
}

const FREQUENCY_NAMES = new Set([
  'f', 'fr', 'f r', 'freq', 'frequency', 'fres', 'f res', 'res freq', 'resonance', 'resonance frequency',
  'resonant frequency', 'resonator frequency', 'f resonance', 'frequency resonance', 'freq res',
  'resonance freq', 'f resonator',
]);
const PROBE_NAMES = new Set(['probe frequency', 'probe freq', 'probe f', 'f probe', 'fprobe', 'freq probe', 'frequency probe', 'probe']);
const BIAS_CURRENT_NAMES = new Set([
  'current', 'coil', 'coil current', 'coil bias', 'i', 'ibias', 'i bias', 'bias current', 'icoil', 'i coil',
  'flux current', 'flux line current', 'fbl current', 'i flux', 'iflux', 'current bias',
]);
const BIAS_VOLTAGE_NAMES = new Set(['voltage', 'v', 'vbias', 'v bias', 'bias voltage', 'v flux', 'vflux', 'voltage bias']);
const BIAS_OTHER_NAMES = new Set(['bias', 'flux bias', 'flux', 'dc bias', 'squid bias', 'fbl', 'flux line', 'applied flux']);
const SIGMA_WORDS = new Set(['sigma', 'err', 'error', 'uncertainty', 'unc', 'std', 'stderr', 'stdev', 'stddev', 'σ', 'sd', 'se']);
const PHASE_NAMES = new Set(['phase', 'arg', 'angle', 'ang', 'phase angle', 'reflection phase', 'reflected phase', 'theta']);
const RE_NAMES = new Set(['re', 'real', 'real part', 'i q re']);
const IM_NAMES = new Set(['im', 'imag', 'imaginary', 'imag part', 'imaginary part']);
const MAG_NAMES = new Set(['mag', 'magnitude', 'abs', 'amp', 'amplitude', 'logmag', 'log mag', 'db', 'lin mag', 'linmag', 'transmission', 'reflection']);
const QL = new Set(['ql', 'qloaded', 'loadedq', 'qload', 'qtot', 'qtotal', 'qloaded factor']);
const QC = new Set(['qc', 'qext', 'qcoupling', 'couplingq', 'qe', 'qcoupled', 'qcoup']);
const QI = new Set(['qi', 'qint', 'qinternal', 'internalq', 'qu', 'qunloaded', 'qintrinsic']);

function fold(s: string): string {
  return s
    .toLowerCase()
    .replace(/[\u00b5\u03bc]/g, 'u')
    .replace(/[()|[\]{}.,:;\-_/\\=*'"`]+/g, ' ')
    .replace(/\s+/g, ' ')
    .trim();
}

export function classifyHeader(header: string, index: number): Column {
  const { quantity, unit: unitText } = parseUnitHeader(header);
  const unit = unitText === null ? null : normaliseUnit(unitText);
  const col: Column = { index, header, quantity, unitText, unit, role: null, sparam: null, nameQuantity: null };
  let q = quantity.toLowerCase();
  const sp = /(?:^|[^a-z0-9])s\s*[_-]?\s*(11|21|12|22)(?![0-9])/.exec(q) ?? /^s(11|21|12|22)/.exec(q);
  if (sp) {
    col.sparam = `S${sp[1]}` as SParam;
    q = q.replace(/s\s*[_-]?\s*(11|21|12|22)(?![0-9])/, ' ');
  }
  const hadBars = /\|/.test(quantity);
  const name = fold(q);
  const compact = name.replace(/ /g, '');
  const words = name === '' ? [] : name.split(' ');
  const ukind = unit?.kind ?? null;

  // Uncertainty columns: sigma/err/... plus (optionally) what they are the uncertainty of.
  const glued = /^(sigma|err|std|unc)(f|fr|freq)$|^(f|fr|freq)(err|sigma|std|unc)$/.test(compact); // 'sigmaf', 'frerr'
  if (glued || words.some((w) => SIGMA_WORDS.has(w))) {
    const rest = words.filter((w) => !SIGMA_WORDS.has(w) && w !== 'of' && w !== 'in').join(' ');
    if (glued || FREQUENCY_NAMES.has(rest)) col.role = 'sigma_frequency';
    else if (PHASE_NAMES.has(rest)) col.role = 'sigma_phase';
    else if (rest === '') col.role = ukind === 'angle' ? 'sigma_phase' : ukind === 'frequency' ? 'sigma_frequency' : 'sigma';
    else col.hint = `looks like the uncertainty of '${rest}', which is not used`;
    return col;
  }
  if (QL.has(compact)) col.role = 'ql';
  else if (QC.has(compact)) col.role = 'qc';
  else if (QI.has(compact)) col.role = 'qi';
  else if (PROBE_NAMES.has(name)) col.role = 'probe_frequency';
  else if (FREQUENCY_NAMES.has(name) && !col.sparam) col.role = 'frequency';
  else if (BIAS_CURRENT_NAMES.has(name)) {
    col.role = 'bias';
    col.nameQuantity = 'current';
  } else if (BIAS_VOLTAGE_NAMES.has(name)) {
    col.role = 'bias';
    col.nameQuantity = 'voltage';
  } else if (BIAS_OTHER_NAMES.has(name)) col.role = 'bias';
  else if (RE_NAMES.has(name)) col.role = 're';
  else if (IM_NAMES.has(name)) col.role = 'im';
  else if (PHASE_NAMES.has(name)) col.role = 'phase';
  else if (MAG_NAMES.has(name) || (name === '' && col.sparam)) {
    if (ukind === 'decibel' || name === 'db' || name === 'logmag' || name === 'log mag') col.role = 'mag_db';
    else if (ukind === 'power') col.hint = `'${unitText}' is a power level; the response magnitude is expected in dB (ratio) or linear`;
    else if (ukind === 'angle') col.role = 'phase';
    else if (name !== '' || hadBars || ukind === 'linear') col.role = 'mag_lin';
    else col.hint = `name it '${col.sparam} [dB]' for dB magnitude or '|${col.sparam}|' for linear magnitude`;
  }
  // A frequency with an S-parameter in its name ('S21 f') is not a thing; anything else stays unused.
  return col;
}

export function describeColumns(cols: Column[]): string {
  return cols.map((c) => `'${c.header}'`).join(', ');
}
