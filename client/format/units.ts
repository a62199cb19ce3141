// Human formatting of design quantities. SI prefixes per the SI Brochure (BIPM, 9th ed.).

const PREFIXES: { exp: number; symbol: string }[] = [
  { exp: 12, symbol: 'T' },
  { exp: 9, symbol: 'G' },
  { exp: 6, symbol: 'M' },
  { exp: 3, symbol: 'k' },
  { exp: 0, symbol: '' },
  { exp: -3, symbol: 'm' },
  { exp: -6, symbol: 'µ' },
  { exp: -9, symbol: 'n' },
  { exp: -12, symbol: 'p' },
  { exp: -15, symbol: 'f' },
];

/** e.g. siFormat(6.1234e9, 'Hz', 4) → "6.123 GHz"; null/NaN → "—". */
export function siFormat(value: number | null | undefined, unit: string, significant = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (value === 0) return `0 ${unit}`;
  const mag = Math.floor(Math.log10(Math.abs(value)));
  const p = PREFIXES.find((x) => mag >= x.exp) ?? PREFIXES[PREFIXES.length - 1];
  const scaled = value / 10 ** p.exp;
  return `${Number(scaled.toPrecision(significant))} ${p.symbol}${unit}`;
}

export const formatFrequency = (hz: number | null | undefined) => siFormat(hz, 'Hz', 5);
export const formatImpedance = (ohm: number | null | undefined) =>
  ohm === null || ohm === undefined || !Number.isFinite(ohm) ? '—' : `${Number(ohm.toPrecision(4))} Ω`;
export const formatInductance = (h: number | null | undefined) => siFormat(h, 'H', 4);

/** ISO date or timestamp → "2026-03-14" (dates) or "2026-03-14 09:30" (timestamps), UTC. */
export function formatDate(iso: string | null | undefined, withTime = false): string {
  if (!iso) return '—';
  const t = Date.parse(iso);
  if (!Number.isFinite(t)) return iso;
  const s = new Date(t).toISOString();
  return withTime ? `${s.slice(0, 10)} ${s.slice(11, 16)} UTC` : s.slice(0, 10);
}
