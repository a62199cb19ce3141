/**
 * Input parsers of the calibration core: tuning points, raw complex sweeps, Touchstone sets, phase versus flux.
 *
 * Header forms (case and separators folded): unit in brackets/parentheses/braces or as the last
 * '_'/space token: `bias [mA]`, `coil current (uA)`, `f_r (Hz)`, `bias_mA`, `f_GHz`, `flux_bias_V`.
 * Bias: bias, current, coil (current), flux (bias), voltage, I, V, Ibias, Vbias…; units A mA uA/µA nA
 * V mV uV (also Phi0, a.u.). Frequency: f, fr, f_r, freq, frequency, resonance (frequency), fres….
 * Uncertainty: sigma/err/error/uncertainty/std (+ f or phase). Q: Ql, Qc (Qext), Qi (Qint).
 * Response: `S21 real`/`S21 imag`, `Re(S21)`/`Im(S21)`, `S21_re`; `S21 [dB]` + `phase [deg]`;
 * `|S21|` + `phase [rad]`. S21/S12 → notch, S11/S22 → reflection. Probe: `probe frequency [GHz]` or
 * `# probe_frequency = 6.1 GHz`. Rows are file lines (header = row 1 when nothing precedes it).
 */
export { SweepParseError, MAX_ERRORS, type ParseIssue } from './issues';
export type {
  SweepData,
  TuningPointsData,
  TuningPoint,
  RawSweepData,
  RawTrace,
  PhaseFluxData,
  PhasePoint,
  ParseOptions,
  InputKind,
  Geometry,
  BiasQuantity,
} from './types';
export { detectKind, parseSweepText } from './detect';
export { parseTouchstoneSet, biasFromName, type TouchstoneInput, type TouchstoneSetOptions } from './touchstone';
export { parseTuningPoints } from './tuning';
export { parseRawComplex, MIN_TRACE_POINTS, geometryOfSParam } from './raw';
export { parsePhaseFlux } from './phase';
export { parseUnitHeader, normaliseUnit, parseFrequencyValue, conversionFactor, toHzFactor } from './units';
export { classifyHeader, type Column, type ColumnRole, type SParam } from './columns';
