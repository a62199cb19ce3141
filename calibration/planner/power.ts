/**
 * Pump power at the generator for a flux-pump amplitude δΦ.
 *
 * Mutual inductance from the dc flux period measured through the pump line: M_p = Φ0/period, so
 * δΦ/Φ0 = I_p/period (period in amperes of pump-line current per Φ0).
 *
 * Standing-wave factor (derived): a line of impedance Z0 shorted at the SQUID end reflects with
 * Γ = −1. The incident wave V⁺, I⁺ = V⁺/Z0 and the reflected wave V⁻ = −V⁺, I⁻ = −V⁻/Z0 = +I⁺ add
 * at the short to V = 0 and I = 2I⁺. An incident power P_inc = |V⁺|²/(2Z0) = Z0|I⁺|²/2 (peak
 * amplitudes) therefore drives a peak current I_p = 2·sqrt(2 P_inc/Z0) through the short, i.e.
 * P_inc = Z0·I_p²/8.
 *
 * Generator power: P_gen = P_inc·10^{A/10} for a total attenuation A dB between generator and chip.
 * Threshold anchor (alternative): δΦ ∝ √P, so P = P_th·(δΦ/δΦ_th)².
 */
import { FLUX_QUANTUM } from '../constants';

export function dbmToWatts(dbm: number): number {
  return 1e-3 * 10 ** (dbm / 10);
}

export function wattsToDbm(w: number): number {
  return 10 * Math.log10(w / 1e-3);
}

/** Pump-line mutual inductance M_p = Φ0/period (H when the period is in A). */
export function pumpMutualInductance(pumpPeriodA: number): number {
  return FLUX_QUANTUM / pumpPeriodA;
}

/** Peak pump current for a flux amplitude δΦ (Φ0 units): I_p = δΦ·Φ0/M_p = δΦ·period. */
export function pumpCurrentForFlux(deltaPhi: number, pumpPeriodA: number): number {
  return (deltaPhi * FLUX_QUANTUM) / pumpMutualInductance(pumpPeriodA);
}

/** Incident power at the chip for a peak current I_p at the short: P_inc = Z0·I_p²/8. */
export function incidentPowerForShortCurrent(peakCurrentA: number, z0Ohm: number): number {
  return (z0Ohm * peakCurrentA * peakCurrentA) / 8;
}

export interface StageDissipation {
  stage: string;
  attenuation_db: number;
  /** Power absorbed by this attenuator from the forward pump wave, W. */
  dissipated_w: number;
}

/**
 * Split the forward pump power among the attenuators (top → bottom). The pump reflected by the
 * short travels back towards the generator; we book all of it on the coldest stage, a deliberate
 * overestimate (how much it deposits there depends on circulators and isolators we do not know).
 */
export function stageDissipation(
  generatorW: number, stagesDb: readonly number[], reflectedW: number, names?: readonly string[],
): StageDissipation[] {
  let p = generatorW;
  return stagesDb.map((a, i) => {
    const absorbed = p * (1 - 10 ** (-a / 10));
    p -= absorbed;
    const last = i === stagesDb.length - 1;
    return {
      stage: names?.[i] ?? (last ? `stage ${i + 1} (coldest)` : `stage ${i + 1}`),
      attenuation_db: a,
      dissipated_w: absorbed + (last ? reflectedW : 0),
    };
  });
}
