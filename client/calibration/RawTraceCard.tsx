// One raw trace of a raw/Touchstone fit with its fitted response: |S| versus frequency and the
// complex plane with the resonance circle. Data from GET /api/fits/:id/traces/:index.
import React, { useMemo, useState } from 'react';
import { useWindowDimensions, View } from 'react-native';
import type { TraceJson } from '@/calibration/contract';
import { IqPlaneLazy, XYChartLazy } from '../charts/LazyChart';
import type { Series } from '../charts/series';
import { useFitTrace, type TraceView } from '../queries/fits';
import { colors, space } from '../theme';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { fmtSig } from './format';

const db = (re: number, im: number) => 10 * Math.log10(re * re + im * im || 1e-30);

function TraceCharts({ t, wide }: { t: TraceView; wide: boolean }) {
  const { width } = useWindowDimensions();
  const magSeries = useMemo<Series[]>(() => {
    const data = t.freqHz.map((f, i) => ({ x: f / 1e9, y: db(t.re[i], t.im[i]) }));
    const s: Series[] = [{ key: 'data', kind: 'scatter', color: colors.inkSoft, points: data, size: 1.8 }];
    if (t.model) s.push({ key: 'model', kind: 'line', color: colors.accent, points: t.freqHz.map((f, i) => ({ x: f / 1e9, y: db(t.model!.re[i], t.model!.im[i]) })), size: 2 });
    return s;
  }, [t]);
  // Phone: the card spans the screen less its padding; wide: the IQ plane sits beside |S|.
  const iqSize = Math.max(180, Math.min(wide ? 300 : width - 2 * space.lg - 2 * space.lg - 2, 360));
  return (
    <View style={{ flexDirection: wide ? 'row' : 'column', gap: space.lg }}>
      <View style={{ flex: wide ? 1 : undefined, minWidth: 0, gap: space.xs }} testID="trace-magnitude">
        <Text variant="monoSmall">|S| [dB]</Text>
        <XYChartLazy series={magSeries} height={wide ? 300 : 220} />
        <Text variant="monoSmall" style={{ textAlign: 'center' }}>
          frequency [GHz]
        </Text>
      </View>
      <View style={{ gap: space.xs, alignItems: wide ? 'flex-start' : 'center' }} testID="trace-iq">
        <Text variant="monoSmall" style={{ alignSelf: 'flex-start' }}>
          complex plane (cable delay removed)
        </Text>
        <IqPlaneLazy size={iqSize} data={{ re: t.delayRemoved.re, im: t.delayRemoved.im }} model={t.delayRemoved.model} circle={t.circle} />
      </View>
    </View>
  );
}

function Stat({ label, value }: { label: string; value: string }) {
  return (
    <View style={{ gap: 2 }}>
      <Text variant="caption">{label}</Text>
      <Text variant="mono">{value}</Text>
    </View>
  );
}

export function RawTraceCard({ fitId, traces, biasUnit, wide }: { fitId: number; traces: TraceJson[]; biasUnit: string; wide: boolean }) {
  // Start at the middle trace: the ends of a sweep are often near the lobe edge.
  const [index, setIndex] = useState(() => Math.floor(traces.length / 2));
  const q = useFitTrace(fitId, traces.length ? index : null);
  if (traces.length === 0) return null;
  const meta = traces[index];
  return (
    <Card
      title="Raw trace"
      testID="raw-trace"
      aside={
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.xs }}>
          <Button small kind="secondary" label="‹" accessibilityLabel="Previous trace" disabled={index <= 0} onPress={() => setIndex((i) => Math.max(0, i - 1))} testID="trace-prev" />
          <Text variant="mono" testID="trace-index">
            {index + 1}/{traces.length}
          </Text>
          <Button small kind="secondary" label="›" accessibilityLabel="Next trace" disabled={index >= traces.length - 1} onPress={() => setIndex((i) => Math.min(traces.length - 1, i + 1))} testID="trace-next" />
        </View>
      }
    >
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', columnGap: space.xl, rowGap: space.sm }} testID="trace-stats">
        <Stat label="bias" value={`${fmtSig(meta.bias, 5)} ${biasUnit}`} />
        <Stat label="f_r" value={meta.fr_hz ? `${(meta.fr_hz / 1e9).toFixed(6)} GHz` : '—'} />
        <Stat label="Q_i" value={fmtSig(meta.qi, 3)} />
        <Stat label="|Q_c|" value={fmtSig(meta.qc, 3)} />
        <Stat label="SNR" value={fmtSig(meta.snr, 3)} />
      </View>
      {meta.flag ? (
        <Text variant="small" style={{ color: colors.pending }}>
          Flagged ({meta.flag.replace('_', ' ')}): {meta.reason ?? 'left out of the tuning fit'}
        </Text>
      ) : null}
      {q.isPending ? (
        <LoadingState label="Re-reading the trace from the stored sweep…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => void q.refetch()} title="Could not load this trace" />
      ) : (
        <TraceCharts t={q.data} wide={wide} />
      )}
    </Card>
  );
}
