// Charts of the planner: the tuning curve with the operating point and the pump's flux swing, and
// the emission spectrum of the current plan. Both go through LazyChart (Skia loads after mount).
import React, { useMemo } from 'react';
import type { CalibrationJson } from '@/shared/api/calibration';
import { fluxFromBias, resonanceFrequency } from '@/calibration/squid/model';
import { modelCurve } from '../calibration/FitCharts';
import { ChartCard } from '../calibration/ChartCard';
import { frequencyAxis } from '../calibration/format';
import { XYChartLazy } from '../charts/LazyChart';
import type { Series, XY } from '../charts/series';
import { colors } from '../theme';
import { Text } from '../ui/Text';
import { spectrumOf } from './spectrum';
import type { PlanResult } from './types';

/** Model value of the calibration at a bias: the SQUID-line frequency, or the phase fit's model (interpolated). */
function modelAt(cal: CalibrationJson, bias: number): number | null {
  const p = cal.params;
  if (cal.model !== 'phase' && p.f0_hz && p.gamma0 && p.asymmetry && p.flux_period && p.flux_offset) {
    const f = resonanceFrequency(
      fluxFromBias(bias, p.flux_period.value, p.flux_offset.value),
      { f0Hz: p.f0_hz.value, gamma0: p.gamma0.value, asymmetry: p.asymmetry.value, csOverCr: p.cs_over_cr?.value ?? 0 },
      cal.model,
    );
    return Number.isFinite(f) ? f : null;
  }
  const pts = [...cal.points].sort((a, b) => a.bias - b.bias);
  for (let i = 1; i < pts.length; i++) {
    if (pts[i].bias >= bias) {
      const a = pts[i - 1];
      const b = pts[i];
      const w = b.bias === a.bias ? 0 : (bias - a.bias) / (b.bias - a.bias);
      return a.model + w * (b.model - a.model);
    }
  }
  return null;
}

export const OperatingPointChart = React.memo(function OperatingPointChart({ cal, bias, amplitudePhi0, wide }: { cal: CalibrationJson; bias: number; amplitudePhi0: number | null; wide: boolean }) {
  const phase = cal.model === 'phase';
  const ax = useMemo(() => (phase ? { scale: 1, unit: 'rad' } : frequencyAxis(cal.points.map((q) => q.measured))), [cal, phase]);
  const base = useMemo<Series[]>(() => {
    const sc = (pts: XY[]) => pts.map((q) => ({ x: q.x, y: q.y * ax.scale }));
    return [
      { key: 'data', kind: 'scatter', color: colors.ruleStrong, points: sc(cal.points.filter((q) => !q.outlier).map((q) => ({ x: q.bias, y: q.measured }))), size: 2 },
      { key: 'model', kind: 'line', color: colors.ink, points: sc(modelCurve(cal)), size: 1.5 },
    ];
  }, [cal, ax]);
  const series = useMemo<Series[]>(() => {
    const y = modelAt(cal, bias);
    if (y === null) return base;
    const period = Math.abs(cal.params.flux_period?.value ?? 0);
    const swing: XY[] = [];
    if (amplitudePhi0 !== null && Number.isFinite(amplitudePhi0) && period > 0) {
      const db = amplitudePhi0 * period;
      for (let i = 0; i <= 12; i++) {
        const b = bias - db + (2 * db * i) / 12;
        const v = modelAt(cal, b);
        if (v !== null) swing.push({ x: b, y: v * ax.scale });
      }
    }
    return [
      ...base,
      { key: 'swing', kind: 'line', color: colors.accent, points: swing, size: 5 },
      { key: 'op', kind: 'scatter', color: colors.accent, points: [{ x: bias, y: y * ax.scale }], size: 6 },
    ];
  }, [base, cal, bias, amplitudePhi0, ax]);
  return (
    <ChartCard
      title={phase ? 'Phase versus bias' : 'Tuning curve'}
      testID="plan-tuning-chart"
      yTitle={phase ? 'reflected phase [rad]' : `resonance frequency [${ax.unit}]`}
      xTitle={`bias [${cal.bias_unit}]`}
      legend={[
        { label: 'calibration data', color: colors.ruleStrong, shape: 'dot' },
        { label: `${cal.model} model`, color: colors.ink, shape: 'line' },
        { label: 'operating point ± pump swing', color: colors.accent, shape: 'dot' },
      ]}
    >
      <XYChartLazy series={series} height={wide ? 240 : 190} testID="plan-tuning-plot" />
    </ChartCard>
  );
});

export const SpectrumChart = React.memo(function SpectrumChart({ result, wide }: { result: PlanResult | null; wide: boolean }) {
  const data = useMemo(() => (result ? spectrumOf(result) : null), [result]);
  const series = useMemo<Series[]>(() => {
    if (!data) return [];
    const s: Series[] = [{ key: 'spectrum', kind: 'line', color: colors.accent, points: data.points, size: 2 }];
    if (data.band) s.push({ key: 'band', kind: 'line', color: colors.ink, points: [{ x: data.band[0], y: 0 }, { x: data.band[1], y: 0 }], size: 4 });
    return s;
  }, [data]);
  if (!result) return null;
  return (
    <ChartCard
      title="Emission spectrum"
      testID="plan-spectrum-chart"
      yTitle={data?.yTitle ?? ''}
      xTitle={data?.xTitle ?? ''}
      legend={[
        { label: result.mode === 'cavity' ? 'output n(ν), coupling port' : 'emitted photons, δτ²ω(ω_p − ω)', color: colors.accent, shape: 'line' },
        ...(data?.band ? [{ label: 'detection band', color: colors.ink, shape: 'line' as const }] : []),
      ]}
    >
      {data ? <XYChartLazy series={series} height={wide ? 200 : 170} testID="plan-spectrum-plot" /> : <Text variant="small">No spectrum for this plan.</Text>}
    </ChartCard>
  );
});
