/** Drive planner: public API (the CLI and the server call these). */
export * from './types';
export {
  planFromCalibration, planCavity, planLine, rankOperatingPoints, qualityFactorsAtBias, calibratedBiasRange, PlanError,
  CONVENTIONS, RANK_SCORING, RANK_WEIGHTS, RANK_POWER_SPAN_DB, RANK_FLUX_NOISE_PHI0, RANK_NOISE_HALF_CAVITY, RANK_NOISE_HALF_LINE_RAD, RANK_WARNING_PENALTY, DEFAULT_QL, DEFAULT_QC, DEFAULT_COLD_STAGE_LIMIT_W, DEFAULT_DRAWS,
  DEFAULT_SEED, NEAR_THRESHOLD_RATIO, LINEAR_RESPONSE_LIMIT_PHI0, DEFAULT_LOBE_MARGIN_PHI0, THERMAL_OCCUPATION_LIMIT,
  SPEED_OF_LIGHT,
} from './plan';
export type { RankOptions } from './plan';
export { completeFromPumpLine, type PumpLineSettings } from './pumpLine';
export * as cavity from './cavity';
export * as line from './line';
export * as power from './power';
export type { PumpTone } from './line';
