/** Input parsers of the calibration core: tuning points, raw complex sweeps, Touchstone sets, phase versus flux. */
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
