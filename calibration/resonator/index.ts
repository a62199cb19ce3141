// Public surface of the per-trace resonance extraction.
export * from './models';
export { fitCirclePratt } from './circle';
export type { Circle, CircleFit } from './circle';
export { extractResonance, extractSweep, traceToJson, mergeExtractions } from './extract';
export type { ExtractOptions, TraceExtraction, TraceFlag, SweepTrace, SweepExtraction, SweepSummary } from './extract';
