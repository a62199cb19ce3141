// Display of planner numbers: rates in scientific notation, powers in dBm, flux in Φ0 and mΦ0.
import { siFormat } from '../format/units';

const SUPER: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** 1.234e5 → "1.23 × 10⁵"; plain below 1000; "—" when not finite. */
export function sci(x: number | null | undefined, sig = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 0.01 && a < 1000) return String(Number(x.toPrecision(sig)));
  const e = Math.floor(Math.log10(a));
  let m = Number((x / 10 ** e).toPrecision(sig));
  let ee = e;
  if (Math.abs(m) >= 10) {
    m /= 10;
    ee += 1;
  }
  const exp = String(ee).split('').map((c) => SUPER[c] ?? c).join('');
  return `${m.toFixed(Math.max(0, sig - 1))} × 10${exp}`;
}

export const rate = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? '—' : `${sci(x)} /s`);
export const dbm = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? '—' : `${x.toFixed(1)} dBm`);
export const hz = (x: number | null | undefined, sig = 7) => siFormat(x, 'Hz', sig);
export const watts = (x: number | null | undefined) => siFormat(x, 'W', 3);

/** δΦ in Φ0 and mΦ0: "4.12 × 10⁻³ Φ0 (4.12 mΦ0)". */
export function phi0(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return `${sci(x)} Φ0 (${Number((x * 1e3).toPrecision(3))} mΦ0)`;
}

/** Significant digits that tell p16 and p84 apart (3 … 7). */
export function bandDigits(p16: number, p50: number, p84: number): number {
  const rel = (p84 - p16) / Math.abs(p50);
  if (!(rel > 0) || !Number.isFinite(rel)) return 3;
  return Math.min(7, Math.max(3, Math.ceil(-Math.log10(rel)) + 2));
}

/** The 16–84 % band of a rate: "9.9871 × 10⁴ – 1.0013 × 10⁵ (−0.13 % / +0.13 %)". */
export function bandText(p16: number, p50: number, p84: number): string {
  const d = bandDigits(p16, p50, p84);
  const pct = (x: number) => `${x >= 0 ? '+' : '−'}${Number(Math.abs(x).toPrecision(2))} %`;
  return `${sci(p16, d)} – ${sci(p84, d)} (${pct((p16 / p50 - 1) * 100)} / ${pct((p84 / p50 - 1) * 100)})`;
}

export function ratio(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return x.toFixed(digits);
}

export function fixed(x: number | null | undefined, sig = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return String(Number(x.toPrecision(sig)));
}

export const MODE_LABELS = { cavity: 'Cavity (pumped at 2f_r)', line: 'Line (broadband)' } as const;

/** Parses a number typed by a person (accepts 1e5, 1.5E6, "1 000", comma decimals); null when empty. */
export function parseNumber(s: string): number | null | 'bad' {
  const t = s.trim().replace(/\s+/g, '').replace(/,(?=\d{1,2}$)/, '.').replace(/×10\^?/, 'e');
  if (t === '') return null;
  const x = Number(t);
  return Number.isFinite(x) ? x : 'bad';
}

/** "10⁻³" for an exponent. */
export function pow10Text(e: number): string {
  return `10${String(e).split('').map((c) => SUPER[c] ?? c).join('')}`;
}
