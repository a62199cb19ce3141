// The planning API's shapes come from shared/api/planning.ts (the server's contract); the request
// and result objects are the planner core's own types, so the client computes with what it saves.
export type {
  BatchCompareResponse as BatchComparison,
  CompareBatch,
  CompareDeviceValue as CompareDevice,
  CompareParamStats as CompareStats,
  OperatingPointsResponse,
  Plan,
  PlanMode,
  PlanNote,
  PlanRequest,
  PlanResult,
  PlanSummary,
  PlanWarning,
  PreviewResponse,
  PumpLine,
  PumpLineRecord,
  RankedPoint,
  RankResult,
  SpecBounds,
  SpecWindow,
} from '@/shared/api/planning';
