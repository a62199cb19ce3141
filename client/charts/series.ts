// Plain data handed to the lazily loaded chart modules (no Skia or victory types here, so screens
// can build series without pulling the chart libraries into their bundle).

export interface XY {
  x: number;
  y: number;
}

export interface Series {
  key: string;
  kind: 'scatter' | 'line';
  color: string;
  points: XY[];
  /** Scatter radius or line width, px. */
  size?: number;
  /** Drawn hollow (scatter) or dashed-looking thin (line). */
  hollow?: boolean;
}

export interface XYChartProps {
  series: Series[];
  height: number;
  /** Decimals of the tick labels; computed from the domain when left out. */
  xDecimals?: number;
  yDecimals?: number;
  /** Tick label text for a value (e.g. 10^v for log-scaled Q). */
  yTickFormat?: 'plain' | 'pow10';
  /** Fixed y domain, e.g. to keep zero in view. */
  yDomain?: [number, number];
  testID?: string;
}

export interface IqPlaneProps {
  size: number;
  data: { re: number[]; im: number[] };
  model: { re: number[]; im: number[] } | null;
  circle: { xc: number; yc: number; r: number } | null;
  testID?: string;
}

/** Decimals that tell ticks `step` apart: 0.001 → 3, 0.25 → 2, 20 → 0. */
export function decimalsForStep(step: number): number {
  if (!(step > 0) || !Number.isFinite(step)) return 2;
  return Math.max(0, Math.min(8, Math.ceil(-Math.log10(step) + 0.3)));
}

export function extent(values: number[]): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo <= hi ? [lo, hi] : null;
}

const SUPERSCRIPT_PREFIX: Record<number, string> = { 0: '', 3: 'k', 6: 'M', 9: 'G' };

/** 10^v as a short label: 4 → "10k", 5.3 → "200k". */
export function pow10Label(v: number): string {
  const x = 10 ** v;
  const e = Math.floor(Math.log10(x) / 3) * 3;
  const p = SUPERSCRIPT_PREFIX[e];
  if (p === undefined) return x.toExponential(0);
  return `${Number((x / 10 ** e).toPrecision(2))}${p}`;
}
