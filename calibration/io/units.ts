/**
 * Units as written in column headers: `bias [mA]`, `coil current (uA)`, `f_GHz`, `flux_bias_V`.
 * Conversions use mathjs units, so factors come from its SI prefix tables rather than from here.
 */
import { unit as mathUnit } from 'mathjs';

export type BiasQuantity = 'current' | 'voltage' | 'unknown';
export type UnitKind = 'frequency' | 'current' | 'voltage' | 'angle' | 'decibel' | 'power' | 'linear' | 'flux' | 'arbitrary';

interface UnitEntry {
  unit: string;
  kind: UnitKind;
}

// Lower-case spelling -> canonical unit. Case is folded because headers are typed by hand
// ('GHZ', 'ma'); nonsensical readings such as megaampere or millihertz never occur in this trade.
const UNITS: Record<string, UnitEntry> = {};
function add(kind: UnitKind, unit: string, ...spellings: string[]): void {
  for (const s of [unit, ...spellings]) UNITS[s.toLowerCase()] = { unit, kind };
}
add('frequency', 'Hz', 'hertz');
add('frequency', 'kHz', 'khertz');
add('frequency', 'MHz');
add('frequency', 'GHz');
add('current', 'A', 'amp', 'amps', 'ampere', 'amperes');
add('current', 'mA');
add('current', 'uA');
add('current', 'nA');
add('current', 'pA');
add('voltage', 'V', 'volt', 'volts');
add('voltage', 'mV');
add('voltage', 'uV');
add('voltage', 'nV');
add('angle', 'deg', 'degree', 'degrees', '°');
add('angle', 'rad', 'radian', 'radians');
add('decibel', 'dB');
add('power', 'dBm');
add('linear', 'lin', 'linear', '1', 'v/v', 'abs');
add('flux', 'Phi0', 'phi_0', 'φ0', 'φ_0', 'Φ0', 'flux quanta', 'flux quantum');
add('arbitrary', 'a.u.', 'au', 'a.u', 'arb', 'arb.', 'arb. u.', 'arb.u.', 'arbitrary');

export interface NormalisedUnit {
  unit: string;
  kind: UnitKind;
  /** Set when the spelling was read in a way worth telling the user (e.g. 'mHz' read as MHz). */
  note?: string;
}

/** Canonical unit for a spelling, or null when unknown. Micro signs (µ U+00B5, μ U+03BC) become 'u'. */
export function normaliseUnit(written: string): NormalisedUnit | null {
  const compact = written.trim().replace(/[\u00b5\u03bc]/g, 'u').replace(/\s+/g, ' ');
  if (compact === '') return null;
  const hit = UNITS[compact.toLowerCase()] ?? UNITS[compact.toLowerCase().replace(/ /g, '')];
  if (!hit) return null;
  if (compact === 'mHz') return { ...hit, note: "read 'mHz' as MHz (millihertz makes no sense for a microwave resonance)" };
  return { ...hit };
}

/** Split a header into quantity and unit: `bias [mA]`, `coil current (uA)`, `f_GHz`, `Re(S21)`. */
export function parseUnitHeader(header: string): { quantity: string; unit: string | null } {
  const h = header.trim();
  const bracket = /^(.*?)\s*(?:\[([^\][]*)\]|\(([^()]*)\)|\{([^{}]*)\})\s*$/.exec(h);
  if (bracket) {
    const inner = (bracket[2] ?? bracket[3] ?? bracket[4] ?? '').trim();
    const quantity = bracket[1].trim();
    // `Re(S21)`, `abs(S11)`: the parenthesis holds the parameter, not a unit.
    const isParameter = /^s\s*\d\d$/i.test(inner);
    if (!isParameter && quantity !== '') return { quantity, unit: inner === '' ? null : inner };
  }
  // Suffix form: last '_' or space separated token is a known unit (`bias_mA`, `f_GHz`, `flux_bias_V`).
  const m = /^(.+?)[_\s]+([^_\s]+)$/.exec(h);
  if (m) {
    const last = m[2];
    const known = normaliseUnit(last);
    // Single letters only in their SI case ('A', 'V'), so `f_r` or `s21_a` stay names.
    const singleOk = last.length > 1 || last === 'A' || last === 'V';
    if (known && singleOk && known.kind !== 'linear') return { quantity: m[1].trim(), unit: last };
  }
  return { quantity: h, unit: null };
}

/** Factor that converts a value in `from` to `to` (both canonical), via mathjs. */
export function conversionFactor(from: string, to: string): number {
  if (from === to) return 1;
  const f = mathUnit(1, from).toNumber(to);
  // Prefix ratios are exact powers of ten; mathjs may return 1000.0000000000001 for mA -> uA.
  const p = Math.pow(10, Math.round(Math.log10(f)));
  return Math.abs(f / p - 1) < 1e-12 ? p : f;
}

export function toHzFactor(unit: string): number {
  return conversionFactor(unit, 'Hz');
}

export function toRadFactor(unit: string): number {
  return conversionFactor(unit, 'rad');
}

export function biasQuantityOfKind(kind: UnitKind | null): BiasQuantity {
  return kind === 'current' ? 'current' : kind === 'voltage' ? 'voltage' : 'unknown';
}

export const BIAS_UNITS_HINT = 'A, mA, uA, nA, V, mV, uV, Phi0 or a.u.';

/**
 * Read "6.1 GHz", "6.1GHz", "6100 MHz" or "6.1e9" (bare numbers count as Hz only when ≥ 1 MHz).
 * Returns Hz or an explanation of what is wrong.
 */
export function parseFrequencyValue(text: string): { hz: number } | { problem: string } {
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*([A-Za-z]*)\s*$/.exec(text);
  if (!m) return { problem: `'${text.trim()}' is not a frequency (expected e.g. '6.1 GHz')` };
  const value = Number(m[1]);
  let hz: number;
  if (m[2] === '') {
    if (Math.abs(value) < 1e6) return { problem: `'${text.trim()}' has no unit (expected e.g. '6.1 GHz')` };
    hz = value;
  } else {
    const u = normaliseUnit(m[2]);
    if (!u || u.kind !== 'frequency') return { problem: `unknown frequency unit '${m[2]}' (expected Hz, kHz, MHz or GHz)` };
    hz = value * toHzFactor(u.unit);
  }
  if (!(hz > 0) || !Number.isFinite(hz)) return { problem: `frequency must be > 0, got '${text.trim()}'` };
  return { hz };
}
