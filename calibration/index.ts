/**
 * Public surface of the calibration core (pure TypeScript; no server or UI imports).
 * Sub-modules are namespaced because each has its own point and option types.
 */
export * from './contract';
export * from './constants';
export * from './pipeline';
export { CORE_VERSION } from './version';
export * as squid from './squid/model';
export * as fit from './fit';
export * as io from './io';
export * as resonator from './resonator';
export * as tuning from './tuning/fitTuning';
export * as phase from './tuning/phaseFit';
export * as calibrationJson from './tuning/calibrationJson';
export * as planner from './planner';
