/**
 * Synthetic sweeps generated from the core's own models, for benchmarks and the demo lab only.
 * Nothing here is a test reference: tests check against outside sources and committed fixtures.
 */
import { seededRandom, normalSource } from './planner/stats';
import { fluxFromBias, resonanceFrequency, effectiveDelay, type SquidLineParams } from './squid/model';
import { notchResponse, reflectionResponse, type ResonatorGeometry } from './resonator/models';

export interface SyntheticDevice extends SquidLineParams {
  /** Flux period and offset in the bias unit. */
  fluxPeriod: number;
  fluxOffset: number;
  biasUnit: string;
  geometry: ResonatorGeometry;
  /** Internal and coupling quality factors (taken flux-independent). */
  qi: number;
  qcAbs: number;
  phiRad: number;
  /** Measurement chain. */
  a: number;
  alphaRad: number;
  delayS: number;
}

export interface SweepShape {
  biasMin: number;
  biasMax: number;
  points: number;
  seed: number;
}

function biasGrid(s: SweepShape): number[] {
  const n = Math.max(2, s.points);
  return Array.from({ length: n }, (_, i) => s.biasMin + ((s.biasMax - s.biasMin) * i) / (n - 1));
}

function fmt(x: number): string {
  return Number(x.toPrecision(10)).toString();
}

/** Loaded Q from Q_i and the complex Q_c (1/Q_l = 1/Q_i + cos φ/|Q_c|). */
export function loadedQ(dev: SyntheticDevice): number {
  return 1 / (1 / dev.qi + Math.cos(dev.phiRad) / dev.qcAbs);
}

/** Tuning-points CSV: bias, resonance frequency (GHz) with Gaussian noise, sigma column. */
export function tuningPointsCsv(dev: SyntheticDevice, shape: SweepShape & { noiseHz: number }): string {
  const gauss = normalSource(seededRandom(shape.seed));
  const lines = [`# synthetic demo sweep (invented data)`, `bias [${dev.biasUnit}],frequency [GHz],sigma [kHz]`];
  for (const b of biasGrid(shape)) {
    const f = resonanceFrequency(fluxFromBias(b, dev.fluxPeriod, dev.fluxOffset), dev, 'exact') + shape.noiseHz * gauss();
    lines.push(`${fmt(b)},${fmt(f / 1e9)},${fmt(shape.noiseHz / 1e3)}`);
  }
  return lines.join('\n') + '\n';
}

/** One complex trace around the resonance at `bias`, with complex Gaussian noise of rms `noise`. */
export function syntheticTrace(
  dev: SyntheticDevice,
  bias: number,
  freqPoints: number,
  noise: number,
  gauss: () => number,
  spanLinewidths = 14,
): { freqHz: Float64Array; re: Float64Array; im: Float64Array } {
  const fr = resonanceFrequency(fluxFromBias(bias, dev.fluxPeriod, dev.fluxOffset), dev, 'exact');
  const ql = loadedQ(dev);
  const span = (spanLinewidths * fr) / ql;
  // The window is centred on the expected resonance with a small offset, as an engineer tracking it would set it.
  const centre = fr + 0.1 * (fr / ql) * gauss();
  const freqHz = new Float64Array(freqPoints);
  for (let i = 0; i < freqPoints; i++) freqHz[i] = centre - span / 2 + (span * i) / (freqPoints - 1);
  const env = { a: dev.a, alphaRad: dev.alphaRad, delayS: dev.delayS };
  const t =
    dev.geometry === 'notch'
      ? notchResponse(freqHz, { ...env, frHz: fr, ql, qcAbs: dev.qcAbs, phiRad: dev.phiRad })
      : reflectionResponse(freqHz, { ...env, frHz: fr, ql, qc: dev.qcAbs });
  for (let i = 0; i < freqPoints; i++) {
    t.re[i] += (noise / Math.SQRT2) * gauss();
    t.im[i] += (noise / Math.SQRT2) * gauss();
  }
  return { freqHz, re: t.re, im: t.im };
}

/** Long-form raw CSV: one row per (bias, frequency) with real and imaginary parts. */
export function rawComplexCsv(dev: SyntheticDevice, shape: SweepShape & { freqPoints: number; noise: number }): string {
  const gauss = normalSource(seededRandom(shape.seed));
  const s = dev.geometry === 'notch' ? 'S21' : 'S11';
  const out: string[] = [`# synthetic demo sweep (invented data)`, `bias [${dev.biasUnit}],frequency [Hz],${s} real,${s} imag`];
  for (const b of biasGrid(shape)) {
    const t = syntheticTrace(dev, b, shape.freqPoints, shape.noise, gauss);
    const bs = fmt(b);
    for (let i = 0; i < t.freqHz.length; i++) {
      out.push(`${bs},${t.freqHz[i].toFixed(1)},${t.re[i].toPrecision(7)},${t.im[i].toPrecision(7)}`);
    }
  }
  return out.join('\n') + '\n';
}

/** A Touchstone 1.x set (one .s2p file per bias point, RI format, bias in the file name). */
export function touchstoneSet(
  dev: SyntheticDevice,
  shape: SweepShape & { freqPoints: number; noise: number; prefix: string },
): { name: string; text: string }[] {
  const gauss = normalSource(seededRandom(shape.seed));
  return biasGrid(shape).map((b) => {
    const t = syntheticTrace(dev, b, shape.freqPoints, shape.noise, gauss);
    const lines = ['! synthetic demo sweep (invented data)', '# HZ S RI R 50'];
    for (let i = 0; i < t.freqHz.length; i++) {
      // S21 carries the resonance; S11/S12/S22 are set to a plain background.
      lines.push(`${t.freqHz[i].toFixed(1)} 0.1 0 ${t.re[i].toPrecision(7)} ${t.im[i].toPrecision(7)} ${t.re[i].toPrecision(7)} ${t.im[i].toPrecision(7)} 0.1 0`);
    }
    return { name: `${shape.prefix}_bias_${fmt(b)}${dev.biasUnit}.s2p`, text: lines.join('\n') + '\n' };
  });
}

/** Reflected phase versus flux at a fixed probe frequency for a non-resonant SQUID termination. */
export function phaseFluxCsv(
  dev: SyntheticDevice,
  shape: SweepShape & { probeFrequencyHz: number; noiseRad: number; theta0Rad: number },
): string {
  const gauss = normalSource(seededRandom(shape.seed));
  const omega = 2 * Math.PI * shape.probeFrequencyHz;
  const lines = [
    `# synthetic demo sweep (invented data)`,
    `# probe_frequency = ${fmt(shape.probeFrequencyHz / 1e9)} GHz`,
    `bias [${dev.biasUnit}],phase [rad]`,
  ];
  for (const b of biasGrid(shape)) {
    const tau = effectiveDelay(fluxFromBias(b, dev.fluxPeriod, dev.fluxOffset), dev);
    const theta = shape.theta0Rad - 2 * omega * tau + shape.noiseRad * gauss();
    lines.push(`${fmt(b)},${fmt(theta)}`);
  }
  return lines.join('\n') + '\n';
}
