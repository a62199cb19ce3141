// Public surface of the generic least-squares engine.
export * from './types';
export { leastSquares, LEAST_SQUARES_DEFAULTS } from './leastsq';
export { rho, rhoPrime, robustCost, LOSSES } from './loss';
