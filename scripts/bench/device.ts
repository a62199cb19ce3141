/** The invented device every benchmark uses, so their figures describe the same sweep. */
import type { SyntheticDevice } from '../../calibration/synth';

export const BENCH_DEVICE: SyntheticDevice = {
  f0Hz: 6.2e9, gamma0: 0.04, asymmetry: 0.1, fluxPeriod: 1.1, fluxOffset: 0.07, biasUnit: 'mA',
  geometry: 'notch', qi: 4e4, qcAbs: 1.5e4, phiRad: 0.15, a: 0.3, alphaRad: 1.1, delayS: 55e-9,
};

/** The 201 bias × 2001 frequency raw sweep of the speed targets. */
export const BENCH_RAW_SHAPE = { biasMin: -0.6, biasMax: 0.6, points: 201, freqPoints: 2001, noise: 0.004, seed: 7 };
