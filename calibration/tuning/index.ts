// Public surface of the tuning-curve and phase-versus-flux fits.
export * from './fitTuning';
export * from './phaseFit';
export * from './calibrationJson';
export * from './compare';
export { TuningInputError, dominantPeriod, unwrapPhase, wrapToPi, offsetNearestCentre, biasQuantity, robustSigma } from './common';
