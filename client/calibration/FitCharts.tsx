// Tuning curve, residuals and per-trace quality factors of one fit, from its calibration JSON.
import React, { useMemo } from 'react';
import type { CalibrationJson } from '@/shared/api/calibration';
import { fluxFromBias, resonanceFrequency } from '@/calibration/squid/model';
import { XYChartLazy } from '../charts/LazyChart';
import type { Series, XY } from '../charts/series';
import { colors } from '../theme';
import { Text } from '../ui/Text';
import { ChartCard } from './ChartCard';
import { frequencyAxis, residualAxis } from './format';

const CURVE_SAMPLES = 400;
const OUTLIER = colors.danger;

function useChartHeight(wide: boolean): number {
  return wide ? 300 : 240;
}

/** The fitted tuning curve f(bias) evaluated on a dense grid with the fit's parameters. */
export function modelCurve(cal: CalibrationJson): XY[] {
  const p = cal.params;
  const bias = cal.points.map((q) => q.bias);
  if (bias.length === 0) return [];
  let lo = Math.min(...bias);
  let hi = Math.max(...bias);
  if (hi === lo) {
    lo -= 0.5;
    hi += 0.5;
  }
  if (cal.model === 'phase' || !p.f0_hz || !p.gamma0 || !p.asymmetry || !p.flux_period || !p.flux_offset) {
    // Phase model: the core's model values at the data points, in bias order.
    return [...cal.points].sort((a, b) => a.bias - b.bias).map((q) => ({ x: q.bias, y: q.model }));
  }
  const sq = { f0Hz: p.f0_hz.value, gamma0: p.gamma0.value, asymmetry: p.asymmetry.value, csOverCr: p.cs_over_cr?.value ?? 0 };
  const out: XY[] = [];
  for (let i = 0; i <= CURVE_SAMPLES; i++) {
    const b = lo + ((hi - lo) * i) / CURVE_SAMPLES;
    const f = resonanceFrequency(fluxFromBias(b, p.flux_period.value, p.flux_offset.value), sq, cal.model);
    if (Number.isFinite(f) && f > 0) out.push({ x: b, y: f });
  }
  return out;
}

export function TuningCurveCard({ cal, wide }: { cal: CalibrationJson; wide: boolean }) {
  const height = useChartHeight(wide);
  const phase = cal.model === 'phase';
  const { series, yTitle } = useMemo(() => {
    const curve = modelCurve(cal);
    const ax = phase ? { scale: 1, unit: 'rad' } : frequencyAxis(cal.points.map((q) => q.measured));
    const sc = (pts: XY[]) => pts.map((q) => ({ x: q.x, y: q.y * ax.scale }));
    const s: Series[] = [
      { key: 'model', kind: 'line', color: colors.accent, points: sc(curve), size: 2 },
      { key: 'data', kind: 'scatter', color: colors.ink, points: sc(cal.points.filter((q) => !q.outlier).map((q) => ({ x: q.bias, y: q.measured }))), size: 3 },
      {
        key: 'outliers',
        kind: 'scatter',
        color: OUTLIER,
        hollow: true,
        points: sc(cal.points.filter((q) => q.outlier).map((q) => ({ x: q.bias, y: q.measured }))),
        size: 5,
      },
    ];
    return { series: s, yTitle: phase ? 'reflected phase [rad]' : `resonance frequency [${ax.unit}]` };
  }, [cal, phase]);
  const outliers = cal.points.filter((q) => q.outlier).length;
  return (
    <ChartCard
      title={phase ? 'Phase versus bias' : 'Tuning curve'}
      testID="tuning-chart"
      yTitle={yTitle}
      xTitle={`bias [${cal.bias_unit}]`}
      legend={[
        { label: `data (${cal.points.length - outliers})`, color: colors.ink, shape: 'dot' },
        ...(outliers ? [{ label: `outliers (${outliers})`, color: OUTLIER, shape: 'ring' as const }] : []),
        { label: `${cal.model} model`, color: colors.accent, shape: 'line' },
      ]}
    >
      <XYChartLazy series={series} height={height} testID="tuning-chart-plot" />
    </ChartCard>
  );
}

export function ResidualsCard({ cal, wide }: { cal: CalibrationJson; wide: boolean }) {
  const height = wide ? 200 : 170;
  const phase = cal.model === 'phase';
  const { series, unit, rms } = useMemo(() => {
    const ax = phase ? { scale: 1, unit: 'rad' } : residualAxis(cal.points.map((q) => q.residual));
    const bias = cal.points.map((q) => q.bias);
    const lo = Math.min(...bias);
    const hi = Math.max(...bias);
    const good = cal.points.filter((q) => !q.outlier);
    const rms = Math.sqrt(good.reduce((s, q) => s + q.residual * q.residual, 0) / Math.max(1, good.length));
    const s: Series[] = [
      { key: 'zero', kind: 'line', color: colors.ruleStrong, points: [{ x: lo, y: 0 }, { x: hi, y: 0 }], size: 1 },
      { key: 'res', kind: 'scatter', color: colors.ink, points: good.map((q) => ({ x: q.bias, y: q.residual * ax.scale })), size: 3 },
      {
        key: 'resOut',
        kind: 'scatter',
        color: OUTLIER,
        hollow: true,
        points: cal.points.filter((q) => q.outlier).map((q) => ({ x: q.bias, y: q.residual * ax.scale })),
        size: 5,
      },
    ];
    return { series: s, unit: ax.unit, rms: rms * ax.scale };
  }, [cal, phase]);
  return (
    <ChartCard
      title="Residuals"
      testID="residuals-chart"
      yTitle={`measured − model [${unit}]`}
      xTitle={`bias [${cal.bias_unit}]`}
      aside={
        <Text variant="monoSmall" testID="residual-rms">
          rms {Number(rms.toPrecision(3))} {unit}
        </Text>
      }
    >
      <XYChartLazy series={series} height={height} testID="residuals-chart-plot" />
    </ChartCard>
  );
}

/** Q_i and |Q_c| of each raw trace versus bias (log scale); flagged traces are left out. */
export function TraceQCard({ cal, wide }: { cal: CalibrationJson; wide: boolean }) {
  const height = wide ? 240 : 200;
  const traces = cal.traces ?? [];
  const series = useMemo<Series[]>(() => {
    const ok = traces.filter((t) => t.flag === null);
    const pts = (get: (t: (typeof ok)[number]) => number | null) =>
      ok.map((t) => ({ x: t.bias, y: get(t) })).filter((q): q is XY => q.y !== null && q.y > 0).map((q) => ({ x: q.x, y: Math.log10(q.y) }));
    return [
      { key: 'qi', kind: 'scatter', color: colors.accent, points: pts((t) => t.qi), size: 3.5 },
      { key: 'qc', kind: 'scatter', color: colors.ink, points: pts((t) => t.qc), size: 3, hollow: true },
    ];
  }, [traces]);
  if (traces.length === 0) return null;
  const flagged = traces.filter((t) => t.flag !== null).length;
  return (
    <ChartCard
      title="Quality factors per trace"
      testID="q-chart"
      yTitle="quality factor (log scale)"
      xTitle={`bias [${cal.bias_unit}]`}
      legend={[
        { label: 'internal Q_i', color: colors.accent, shape: 'dot' },
        { label: 'coupling |Q_c|', color: colors.ink, shape: 'ring' },
      ]}
      aside={flagged ? <Text variant="caption">{flagged} flagged, not shown</Text> : undefined}
    >
      <XYChartLazy series={series} height={height} yTickFormat="pow10" testID="q-chart-plot" />
    </ChartCard>
  );
}
