/** Shown beside every generator-power figure, whatever the estimate says. */
export const RF_CAUTION =
  'Generator power is an estimate from the calibration and the stored pump line. Defer to the lab’s own rules for cryostat heat load and RF safety: start well below it and ramp while watching the mixing-chamber temperature.';
