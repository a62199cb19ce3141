// Display of fitted quantities: value ± standard error with matching decimals, units, labels.
import type { FitStatus, ParamSummary } from '@/shared/api/calibration';

/** Scale and unit a parameter is shown in (bias-unit parameters get the sweep's unit). */
export interface ParamDisplay {
  label: string;
  short: string;
  unit: string;
  scale: number;
}

export function paramDisplay(name: string, biasUnit: string): ParamDisplay {
  switch (name) {
    case 'f0_hz':
      return { label: 'Bare λ/4 frequency f0', short: 'f0', unit: 'GHz', scale: 1e-9 };
    case 'gamma0':
      return { label: 'Participation γ0', short: 'γ0', unit: '', scale: 1 };
    case 'asymmetry':
      return { label: 'Junction asymmetry d', short: 'd', unit: '', scale: 1 };
    case 'flux_period':
      return { label: 'Flux period', short: 'period', unit: biasUnit, scale: 1 };
    case 'flux_offset':
      return { label: 'Flux offset', short: 'offset', unit: biasUnit, scale: 1 };
    case 'cs_over_cr':
      return { label: 'Capacitance ratio Cs/Cr', short: 'Cs/Cr', unit: '', scale: 1 };
    case 'tau_eff0_s':
      return { label: 'Effective delay τ0', short: 'τ0', unit: 'ps', scale: 1e12 };
    case 'theta0_rad':
      return { label: 'Phase offset θ0', short: 'θ0', unit: 'rad', scale: 1 };
    default:
      return { label: name, short: name, unit: '', scale: 1 };
  }
}

/**
 * "6.12345 ± 0.00012": the error to 2 significant digits, the value to the same decimal place
 * (common practice for reporting uncertainties). Without an error: 6 significant digits.
 */
export function withError(value: number | null | undefined, stderr: number | null | undefined, scale = 1): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const v = value * scale;
  if (stderr === null || stderr === undefined || !Number.isFinite(stderr) || stderr <= 0) return fmtSig(v, 6);
  const e = Math.abs(stderr * scale);
  const decimals = Math.max(0, Math.min(12, 1 - Math.floor(Math.log10(e))));
  return `${v.toFixed(decimals)} ± ${e.toFixed(decimals)}`;
}

export function fmtSig(x: number | null | undefined, sig = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x !== 0 && (Math.abs(x) >= 1e6 || Math.abs(x) < 1e-4)) return x.toExponential(sig - 1);
  return String(Number(x.toPrecision(sig)));
}

/** |σ/value| as a percentage, or null when not defined. */
export function relativeError(value: number, stderr: number | null | undefined): number | null {
  if (stderr === null || stderr === undefined || !Number.isFinite(stderr) || value === 0) return null;
  return Math.abs(stderr / value) * 100;
}

export function summary(p: ParamSummary | null | undefined, scale = 1, unit = ''): string {
  if (!p) return '—';
  const s = withError(p.value, p.stderr, scale);
  return unit ? `${s} ${unit}` : s;
}

export const FIT_STATUS: Record<FitStatus, { label: string; tone: 'pending' | 'ok' | 'danger' | 'neutral' }> = {
  proposed: { label: 'Proposed', tone: 'pending' },
  accepted: { label: 'Accepted', tone: 'ok' },
  rejected: { label: 'Rejected', tone: 'danger' },
  superseded: { label: 'Superseded', tone: 'neutral' },
};

export const KIND_LABELS: Record<string, string> = {
  tuning_points: 'Tuning points',
  raw_complex: 'Raw complex sweep',
  touchstone: 'Touchstone set',
  phase_flux: 'Phase versus flux',
};

export const MODEL_LABELS: Record<string, string> = {
  exact: 'Exact (x·tan x)',
  approx: 'Approximate f0/(1+γ)',
  phase: 'Reflected phase',
};

/** Bias values are in the file's unit; frequencies in GHz for the axes. */
export function frequencyAxis(hzValues: number[]): { scale: number; unit: string } {
  const max = Math.max(...hzValues.map(Math.abs).filter(Number.isFinite), 0);
  if (max >= 1e9) return { scale: 1e-9, unit: 'GHz' };
  if (max >= 1e6) return { scale: 1e-6, unit: 'MHz' };
  return { scale: 1e-3, unit: 'kHz' };
}

/** Residuals (Hz) in the unit that keeps the largest one between 1 and 1000. */
export function residualAxis(hzValues: number[]): { scale: number; unit: string } {
  const max = Math.max(...hzValues.map(Math.abs).filter(Number.isFinite), 0);
  if (max >= 1e9) return { scale: 1e-9, unit: 'GHz' };
  if (max >= 1e6) return { scale: 1e-6, unit: 'MHz' };
  if (max >= 1e3) return { scale: 1e-3, unit: 'kHz' };
  return { scale: 1, unit: 'Hz' };
}
