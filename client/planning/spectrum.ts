// Emission spectra of a plan, evaluated in the client with the core's own formulas
// (calibration/planner cavity/line namespaces), so the chart is the planner's model, not a sketch.
import { BOLTZMANN_K, PLANCK_H } from '@/calibration/constants';
import { cavity, line } from '@/calibration/planner';
import type { XY } from '../charts/series';
import { pow10Text } from './format';
import type { PlanResult } from './types';

export interface SpectrumData {
  points: XY[];
  /** Detection band edges on the x axis, when a band applies. */
  band: [number, number] | null;
  xTitle: string;
  yTitle: string;
  /** y scale: the curve is drawn as y × 10^-exponent so tick labels stay short. */
  exponent: number;
}

const SAMPLES = 241;

function scaleY(raw: XY[]): { points: XY[]; exponent: number } {
  const max = Math.max(...raw.map((p) => p.y).filter(Number.isFinite), 0);
  const exponent = max > 0 ? Math.floor(Math.log10(max)) : 0;
  return { points: raw.map((p) => ({ x: p.x, y: p.y / 10 ** exponent })), exponent };
}

/**
 * Cavity: output spectrum n_out(ν) = (2n_th + 1)·κ_c κ g²/|D(ν)|² (photons/s per Hz) versus the
 * offset ν/2π from f_p/2, over ±4 linewidths (or the band, if wider). Line: the parabola
 * δτ²ω(ω_p − ω) (vacuum) or its thermal form, from 0 to f_p.
 */
export function spectrumOf(r: PlanResult): SpectrumData | null {
  if (r.mode === 'cavity') {
    if (r.kappa_over_2pi_hz === null || r.resonance_hz === null || r.qc === null || r.drive_ratio === null) return null;
    const kappa = 2 * Math.PI * r.kappa_over_2pi_hz;
    const d: cavity.CavityDrive = {
      kappa,
      kappaC: (2 * Math.PI * r.resonance_hz) / r.qc,
      deltaOmega: r.drive_ratio * kappa,
      detuning: 2 * Math.PI * (r.detuning_hz ?? 0),
    };
    const halfBand = r.band_hz ? (r.band_hz.high - r.band_hz.low) / 2 : 0;
    const spanHz = Math.max(4 * r.kappa_over_2pi_hz, 1.2 * halfBand, 4 * Math.abs(r.detuning_hz ?? 0));
    const enh = 2 * r.n_thermal + 1;
    const raw: XY[] = [];
    for (let i = 0; i < SAMPLES; i++) {
      const fHz = -spanHz + (2 * spanHz * i) / (SAMPLES - 1);
      raw.push({ x: fHz / 1e6, y: enh * cavity.vacuumOutputSpectrum(2 * Math.PI * fHz, d) });
    }
    const s = scaleY(raw);
    return {
      ...s,
      band: r.band_hz ? [-halfBand / 1e6, halfBand / 1e6] : null,
      xTitle: 'offset from f_p/2 [MHz]',
      yTitle: `output photons [× ${pow10Text(s.exponent)} /s/Hz]`,
    };
  }
  if (r.delta_tau_s === null) return null;
  const fp = r.pump_frequency_hz;
  const wp = 2 * Math.PI * fp;
  const tK = r.temperature_k;
  const nth = tK > 0 ? (w: number) => (w > 0 ? 1 / Math.expm1((PLANCK_H * w) / (2 * Math.PI * BOLTZMANN_K * tK)) : 0) : null;
  const raw: XY[] = [];
  for (let i = 0; i < SAMPLES; i++) {
    const f = (fp * (i + 0.5)) / SAMPLES;
    const w = 2 * Math.PI * f;
    const y = nth ? line.lineExcessSpectrum(w, wp, r.delta_tau_s, nth) : line.lineVacuumSpectrum(w, wp, r.delta_tau_s);
    raw.push({ x: f / 1e9, y });
  }
  const s = scaleY(raw);
  return {
    ...s,
    band: r.band_hz ? [r.band_hz.low / 1e9, Math.min(r.band_hz.high, fp) / 1e9] : null,
    xTitle: 'frequency [GHz]',
    yTitle: `photons [× ${pow10Text(s.exponent)} /s/Hz]`,
  };
}
