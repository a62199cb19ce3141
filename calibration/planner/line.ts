/**
 * Line mode: a dc SQUID terminating a long (broadband) transmission line, flux-pumped at ω_p.
 * The SQUID acts as a mirror at effective distance L_eff = L_s/L′ behind the short; its delay
 * τ_eff = L_eff/v = L_s/Z0. (Johansson, Johansson, Wilson, Nori, PRL 103, 147003 (2009);
 * PRA 82, 052509 (2010).)
 *
 * Conventions (documented, tested):
 *  - Spectra are photons/s per Hz of bandwidth: n(ω) = ⟨a_out†(ω) a_out(ω)⟩ with operators
 *    normalised so that the photon flux is ∫ n(ω) dω/2π = ∫ n df. Hence the total rate
 *    Γ = ∫₀^{ω_p} δτ² ω(ω_p − ω) dω/2π = δτ² ω_p³ /(12π).
 *  - δτ is the peak amplitude of τ_eff(t) = τ̄ + δτ·cos(ω_p t).
 *  - One-sided line: Γ is half the two-faced moving-mirror rate (Ω/6π)(v/c)² of
 *    Lambrecht, Jaekel, Reynaud, PRL 77, 615 (1996) [from memory] with v = δL_eff·Ω.
 *
 * Thermal input (n(ω) = 1/(e^{ħω/kT} − 1)): the output is a_out(ω) = α₀ a_in(ω) + α₊ a_in(ω+ω_p)
 * + α₋ a_in(ω−ω_p) (a_in(−ω) ≡ a_in†(ω)), |α±|² = δτ² ω|ω ± ω_p|. Keeping the O(δτ²) part of |α₀|²
 * that the bosonic commutator fixes, |α₀|² = 1 − |α₊|² − |α₋|²·sgn(ω − ω_p), gives
 *   n_out − n(ω) = δτ²{ ω(ω_p−ω)[1 + n(ω) + n(ω_p−ω)]Θ(ω_p−ω)
 *                     + ω(ω+ω_p)[n(ω+ω_p) − n(ω)] + ω(ω−ω_p)[n(ω−ω_p) − n(ω)]Θ(ω−ω_p) }.
 * This differs from the first-order form in PHYSICS.md by the −n(ω) (scattering-out) and +n(ω)
 * (stimulated) terms of the same order; without them photon number is not conserved by pure
 * frequency conversion. With flat n it reduces to (2n + 1)·δτ²ω(ω_p − ω), as in the cavity case.
 */
import FFT from 'fft.js';

/** Vacuum-input output flux density, photons/s per Hz, for a single pump tone. */
export function lineVacuumSpectrum(omega: number, omegaP: number, deltaTau: number): number {
  if (!(omega > 0) || !(omega < omegaP)) return 0;
  return deltaTau * deltaTau * omega * (omegaP - omega);
}

/** Excess output flux density over the thermal input, photons/s per Hz (see derivation above). */
export function lineExcessSpectrum(
  omega: number, omegaP: number, deltaTau: number, nth: (omega: number) => number,
): number {
  if (!(omega > 0)) return 0;
  const t2 = deltaTau * deltaTau;
  const n0 = nth(omega);
  let s = omega * (omega + omegaP) * (nth(omega + omegaP) - n0);
  if (omega < omegaP) s += omega * (omegaP - omega) * (1 + n0 + nth(omegaP - omega));
  else if (omega > omegaP) s += omega * (omega - omegaP) * (nth(omega - omegaP) - n0);
  return t2 * s;
}

/** Total photon rate of one tone (vacuum), Γ = δτ² ω_p³/(12π), photons/s. */
export function lineTotalRate(omegaP: number, deltaTau: number): number {
  return (deltaTau * deltaTau * omegaP ** 3) / (12 * Math.PI);
}

/** Peak effective mirror velocity over the line's phase velocity, v_eff/v = δτ·ω_p. */
export function veffOverV(omegaP: number, deltaTau: number): number {
  return deltaTau * omegaP;
}

/**
 * Photons/s (vacuum input) emitted into [fLo, fHi] Hz by one tone at fP Hz with amplitude δτ:
 * ∫ δτ²(2π)² f(f_p − f) df = δτ²(2π)²[f_p f²/2 − f³/3].
 */
export function lineBandRateVacuum(fP: number, deltaTau: number, fLo: number, fHi: number): number {
  const a = Math.max(0, fLo);
  const b = Math.min(fP, fHi);
  if (!(b > a)) return 0;
  const prim = (f: number) => (fP * f * f) / 2 - (f * f * f) / 3;
  return deltaTau * deltaTau * 4 * Math.PI * Math.PI * (prim(b) - prim(a));
}

/** Excess photons/s in [fLo, fHi] with thermal input (composite Simpson, smooth integrand). */
export function lineBandRateThermal(
  fP: number, deltaTau: number, fLo: number, fHi: number, nth: (omega: number) => number, panels = 400,
): number {
  const a = Math.max(0, fLo);
  const b = fHi;
  if (!(b > a)) return 0;
  const omegaP = 2 * Math.PI * fP;
  // Split at f_p where the integrand has a kink.
  const pieces: Array<[number, number]> = fP > a && fP < b ? [[a, fP], [fP, b]] : [[a, b]];
  let total = 0;
  for (const [lo, hi] of pieces) {
    const n = panels % 2 === 0 ? panels : panels + 1;
    const h = (hi - lo) / n;
    let s = 0;
    for (let i = 0; i <= n; i++) {
      const f = lo + i * h;
      const w = i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2;
      s += w * lineExcessSpectrum(2 * Math.PI * f, omegaP, deltaTau, nth);
    }
    total += (s * h) / 3;
  }
  return total;
}

/**
 * Two-faced perfect mirror of Lambrecht, Jaekel, Reynaud (1996) [from memory]:
 * N/T = (Ω/6π)(v_max/c)², v_max = aΩ. Returns the peak displacement a (m) that gives `rate`
 * photons/s at drive angular frequency Ω with wave speed c (m/s): a = c·sqrt(6π·rate/Ω³).
 */
export function mirrorAmplitudeForRate(rate: number, omega: number, c: number): number {
  return c * Math.sqrt((6 * Math.PI * rate) / omega ** 3);
}

/** Two-faced mirror rate (Ω/6π)(aΩ/c)² [from memory], photons/s. */
export function twoFacedMirrorRate(amplitude: number, omega: number, c: number): number {
  const v = amplitude * omega;
  return (omega / (6 * Math.PI)) * (v / c) ** 2;
}

/**
 * Effective length of the SQUID mirror, L_eff = (Φ0/2π)²/(E_J·L′) (Johansson et al. 2009/2010),
 * with E_J in J, L′ in H/m, phi0Over2Pi in Wb.
 */
export function effectiveLengthFromJosephsonEnergy(ej: number, lPrime: number, phi0Over2Pi: number): number {
  return (phi0Over2Pi * phi0Over2Pi) / (ej * lPrime);
}

/** One tone of a periodic pump waveform Φ(t) = Φ_dc + Σ A_k cos(k ω_p t + φ_k). */
export interface PumpTone {
  /** Harmonic number k ≥ 1 of the fundamental ω_p. */
  harmonic: number;
  /** Peak amplitude A_k in Φ0. */
  amplitudePhi0: number;
  phaseRad?: number;
}

/**
 * Harmonic amplitudes of τ_eff(Φ(t)) over one pump period: samples τ_eff on `samples` points
 * (power of two), real FFT (fft.js), δτ_k = 2|c_k|/samples for k ≥ 1. Index 0 holds the mean τ̄.
 */
export function delayHarmonics(
  tauOfFlux: (phi: number) => number, phiDc: number, tones: readonly PumpTone[], samples = 256, maxHarmonic = 16,
): number[] {
  if ((samples & (samples - 1)) !== 0 || samples < 4) throw new RangeError('samples must be a power of two ≥ 4');
  const fft = new FFT(samples);
  const data = new Array<number>(samples);
  for (let i = 0; i < samples; i++) {
    const t = (2 * Math.PI * i) / samples;
    let phi = phiDc;
    for (const tone of tones) phi += tone.amplitudePhi0 * Math.cos(tone.harmonic * t + (tone.phaseRad ?? 0));
    data[i] = tauOfFlux(phi);
  }
  const out = fft.createComplexArray() as number[];
  fft.realTransform(out, data);
  const kMax = Math.min(maxHarmonic, samples / 2 - 1);
  const amps = new Array<number>(kMax + 1);
  amps[0] = out[0] / samples;
  for (let k = 1; k <= kMax; k++) amps[k] = (2 * Math.hypot(out[2 * k], out[2 * k + 1])) / samples;
  return amps;
}

/** Vacuum photons/s in [fLo, fHi] summed over harmonics: harmonic k (amplitude δτ_k) at k·fP. */
export function harmonicBandRateVacuum(fP: number, harmonics: readonly number[], fLo: number, fHi: number): number {
  let s = 0;
  for (let k = 1; k < harmonics.length; k++) s += lineBandRateVacuum(k * fP, harmonics[k], fLo, fHi);
  return s;
}

/** Vacuum output spectrum (photons/s/Hz) summed over harmonics. */
export function harmonicVacuumSpectrum(omega: number, omegaP: number, harmonics: readonly number[]): number {
  let s = 0;
  for (let k = 1; k < harmonics.length; k++) s += lineVacuumSpectrum(omega, k * omegaP, harmonics[k]);
  return s;
}
