// Batch comparison: calibrated parameters of the devices of two or more fabrication batches, per
// batch statistics with robust outliers, a chart per parameter with the spec window, CSV export.
import React, { useEffect, useMemo, useState } from 'react';
import { Platform, Pressable, StyleSheet, View } from 'react-native';
import { paramDisplay } from '../calibration/format';
import { ChartCard } from '../calibration/ChartCard';
import { XYChartLazy } from '../charts/LazyChart';
import type { Series } from '../charts/series';
import { errorMessage } from '../api/http';
import { downloadWithToken } from '../api/download';
import { parseNumber } from '../planning/format';
import type { BatchComparison, CompareBatch, CompareStats, SpecBounds } from '../planning/types';
import { useBatches } from '../queries/batches';
import { compareCsvUrl, useBatchComparison, useDeleteSpecWindow, useSetSpecWindow, type CompareQuery } from '../queries/batchCompare';
import { useSession } from '../session/SessionProvider';
import { colors, fonts, radius, space } from '../theme';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { EmptyState, ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { useIsWide } from '../ui/useLayout';

export const COMPARE_PARAMS = ['f0_hz', 'gamma0', 'asymmetry', 'flux_period', 'flux_offset', 'qi', 'ql', 'qc', 'tau_eff0_s'] as const;
const CHIP_LABELS: Record<(typeof COMPARE_PARAMS)[number], string> = {
  f0_hz: 'f0', gamma0: 'γ0', asymmetry: 'd', flux_period: 'flux period', flux_offset: 'flux offset', qi: 'Q_i', ql: 'Q_l', qc: 'Q_c', tau_eff0_s: 'τ0',
};
const DEFAULT_PARAMS = ['f0_hz', 'gamma0', 'asymmetry', 'qi'];
const BATCH_COLORS = [colors.ink, colors.accent, colors.ok, colors.pending, '#5B4B8A', '#2B6C8F'];

interface Display {
  label: string;
  unit: string;
  scale: number;
}

function display(param: string, serverUnit: string | undefined): Display {
  if (param === 'qi') return { label: 'Internal Q_i (median over traces)', unit: '', scale: 1 };
  if (param === 'ql') return { label: 'Loaded Q_l (median over traces)', unit: '', scale: 1 };
  if (param === 'qc') return { label: 'Coupling Q_c (median over traces)', unit: '', scale: 1 };
  const d = paramDisplay(param, serverUnit ?? '');
  // Parameters the app does not know: show the server's unit unscaled.
  if (d.label === param) return { label: param, unit: serverUnit ?? '', scale: 1 };
  return { label: d.label, unit: d.unit, scale: d.scale };
}

function num(x: number | null | undefined, d: Display, sig = 6): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  const v = x * d.scale;
  if (v !== 0 && (Math.abs(v) >= 1e5 || Math.abs(v) < 1e-3)) return v.toExponential(sig - 2);
  return String(Number(v.toPrecision(sig)));
}

function ToggleChips({ label, options, value, onChange, testID }: { label: string; options: { value: string; label: string }[]; value: string[]; onChange: (v: string[]) => void; testID: string }) {
  return (
    <View style={{ gap: space.xs }}>
      <Text variant="label">{label}</Text>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.xs }} role="group" aria-label={label}>
        {options.map((o) => {
          const on = value.includes(o.value);
          return (
            <Pressable
              key={o.value}
              role="checkbox"
              aria-checked={on}
              aria-label={o.label}
              testID={`${testID}-${o.value}`}
              onPress={() => onChange(on ? value.filter((x) => x !== o.value) : [...value, o.value])}
              style={[styles.chip, on && styles.chipOn]}
            >
              <Text style={[styles.chipText, on && { color: colors.accentInk }]}>{o.label}</Text>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

function SpecWindowForm({ param, d, current, onDone }: { param: string; d: Display; current: SpecBounds | undefined; onDone: () => void }) {
  const setW = useSetSpecWindow();
  const del = useDeleteSpecWindow();
  const [min, setMin] = useState(current?.min != null ? String(Number((current.min * d.scale).toPrecision(8))) : '');
  const [max, setMax] = useState(current?.max != null ? String(Number((current.max * d.scale).toPrecision(8))) : '');
  const [error, setError] = useState<string | null>(null);
  const submit = () => {
    const a = parseNumber(min);
    const b = parseNumber(max);
    if (a === 'bad' || b === 'bad') return setError('Min and max must be numbers (or empty for an open side).');
    if (a === null && b === null) return setError('Give min, max or both.');
    if (a !== null && b !== null && a > b) return setError('Min must not exceed max.');
    setError(null);
    setW.mutate({ param, min: a === null ? null : a / d.scale, max: b === null ? null : b / d.scale }, { onSuccess: onDone });
  };
  return (
    <View style={{ gap: space.sm }} testID={`spec-form-${param}`}>
      <View style={{ flexDirection: 'row', gap: space.md, flexWrap: 'wrap' }}>
        <View style={{ flexGrow: 1, flexBasis: 120 }}>
          <TextField label={`Min${d.unit ? ` (${d.unit})` : ''}`} mono value={min} onChangeText={setMin} testID={`spec-min-${param}`} inputMode="decimal" />
        </View>
        <View style={{ flexGrow: 1, flexBasis: 120 }}>
          <TextField label={`Max${d.unit ? ` (${d.unit})` : ''}`} mono value={max} onChangeText={setMax} testID={`spec-max-${param}`} inputMode="decimal" />
        </View>
      </View>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {setW.isError ? <Notice tone="error">{errorMessage(setW.error)}</Notice> : null}
      <View style={{ flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' }}>
        <Button small label="Set spec window" testID={`spec-save-${param}`} busy={setW.isPending} onPress={submit} />
        {current ? <Button small kind="secondary" label="Remove" testID={`spec-delete-${param}`} busy={del.isPending} onPress={() => del.mutate(param, { onSuccess: onDone })} /> : null}
        <Button small kind="ghost" label="Cancel" onPress={onDone} />
      </View>
    </View>
  );
}

function StatsTable({ batches, param, d }: { batches: CompareBatch[]; param: string; d: Display }) {
  const cols = ['n', 'mean', 'sd', 'median', 'min', 'max'];
  return (
    <View style={styles.table} role="table" testID={`compare-table-${param}`}>
      <View style={[styles.tr, styles.thead]} role="row">
        <Text variant="label" style={[styles.cell, { flex: 1.3 }]} role="columnheader">Batch</Text>
        {cols.map((c) => (
          <Text key={c} variant="label" style={[styles.cell, styles.num, c === 'n' && { flex: 0.5 }]} role="columnheader">{c}</Text>
        ))}
      </View>
      {batches.map((b) => {
        const s: CompareStats | undefined = b.stats[param];
        return (
          <View key={b.id} style={styles.tr} role="row" testID={`compare-row-${param}-${b.code}`}>
            <Text variant="mono" style={[styles.cell, { flex: 1.3, fontFamily: fonts.monoMedium }]} role="cell">{b.code}</Text>
            <Text variant="mono" style={[styles.cell, styles.num, { flex: 0.5 }]} role="cell" testID={`compare-n-${param}-${b.code}`}>{s?.count ?? 0}</Text>
            <Text variant="mono" style={[styles.cell, styles.num]} role="cell" testID={`compare-mean-${param}-${b.code}`}>{num(s?.mean, d)}</Text>
            <Text variant="mono" style={[styles.cell, styles.num]} role="cell">{num(s?.std, d, 3)}</Text>
            <Text variant="mono" style={[styles.cell, styles.num]} role="cell">{num(s?.median, d)}</Text>
            <Text variant="mono" style={[styles.cell, styles.num]} role="cell">{num(s?.min, d)}</Text>
            <Text variant="mono" style={[styles.cell, styles.num]} role="cell">{num(s?.max, d)}</Text>
          </View>
        );
      })}
    </View>
  );
}

function StatsCards({ batches, param, d }: { batches: CompareBatch[]; param: string; d: Display }) {
  return (
    <View style={{ gap: space.xs }} testID={`compare-table-${param}`}>
      {batches.map((b) => {
        const s = b.stats[param];
        return (
          <View key={b.id} style={styles.statCard} testID={`compare-row-${param}-${b.code}`}>
            <View style={{ flexDirection: 'row', justifyContent: 'space-between' }}>
              <Text variant="mono" style={{ fontFamily: fonts.monoMedium }}>{b.code}</Text>
              <Text variant="monoSmall" testID={`compare-n-${param}-${b.code}`}>{`n = ${s?.count ?? 0}`}</Text>
            </View>
            {s && s.count > 0 ? (
              <>
                <Text variant="mono" testID={`compare-mean-${param}-${b.code}`}>{`${num(s.mean, d)}${s.std !== null ? ` ± ${num(s.std, d, 3)}` : ''}`}</Text>
                <Text variant="monoSmall">{`median ${num(s.median, d)} · ${num(s.min, d)} … ${num(s.max, d)}`}</Text>
              </>
            ) : (
              <Text variant="small">No calibrated device of this batch has this parameter.</Text>
            )}
          </View>
        );
      })}
    </View>
  );
}

function DeviceValues({ batches, param, d }: { batches: CompareBatch[]; param: string; d: Display }) {
  return (
    <View style={{ gap: 2 }} testID={`compare-devices-${param}`}>
      {batches.flatMap((b, bi) =>
        (b.stats[param]?.devices ?? []).map((v) => (
          <PressableLink
            key={`${b.id}-${v.deviceId}`}
            href={`/devices/${v.deviceId}`}
            testID={`compare-device-${param}-${v.deviceName}`}
            aria-label={`Open device ${v.deviceName}`}
            style={({ hovered }) => [styles.devLine, hovered && { backgroundColor: '#F1EDE3' }]}
          >
            <View style={[styles.swatch, { backgroundColor: BATCH_COLORS[bi % BATCH_COLORS.length] }]} />
            <Text style={{ fontFamily: fonts.sansMedium, color: colors.accent }}>{v.deviceName}</Text>
            <Text variant="monoSmall">{b.code} · fit v{v.fitVersion}</Text>
            <View style={{ flex: 1 }} />
            <Text variant="mono">{num(v.value, d)}{v.stderr ? ` ± ${num(v.stderr, d, 2)}` : ''}</Text>
            {v.robustZ !== null ? <Text variant="monoSmall">{`z ${v.robustZ.toFixed(1)}`}</Text> : null}
            {v.outlier ? <Badge label="outlier" tone="danger" testID={`compare-outlier-${param}-${v.deviceName}`} /> : null}
            {v.inSpec === false ? <Badge label="out of spec" tone="pending" testID={`compare-outofspec-${param}-${v.deviceName}`} /> : v.inSpec === true ? <Badge label="in spec" tone="ok" /> : null}
          </PressableLink>
        )),
      )}
    </View>
  );
}

function ParamChart({ batches, param, d, spec, wide }: { batches: CompareBatch[]; param: string; d: Display; spec: SpecBounds | undefined; wide: boolean }) {
  const series = useMemo<Series[]>(() => {
    const out: Series[] = [];
    const n = batches.length;
    batches.forEach((b, bi) => {
      const s = b.stats[param];
      if (!s) return;
      const x0 = bi + 1;
      const color = BATCH_COLORS[bi % BATCH_COLORS.length];
      const devs = s.devices;
      const xs = devs.map((_, i) => x0 + (devs.length > 1 ? -0.18 + (0.36 * i) / (devs.length - 1) : 0));
      out.push({ key: `pts${bi}`, kind: 'scatter', color, size: 4, points: devs.map((v, i) => ({ x: xs[i], y: v.value * d.scale })).filter((_, i) => !devs[i].outlier) });
      out.push({ key: `out${bi}`, kind: 'scatter', color: colors.danger, hollow: true, size: 6, points: devs.map((v, i) => ({ x: xs[i], y: v.value * d.scale })).filter((_, i) => devs[i].outlier) });
      if (s.mean !== null) {
        out.push({ key: `mean${bi}`, kind: 'line', color, size: 2, points: [{ x: x0 - 0.28, y: s.mean * d.scale }, { x: x0 + 0.28, y: s.mean * d.scale }] });
        if (s.std !== null) {
          // mean ± sd as a (nearly) vertical bar beside the points
          const xb = x0 + 0.32;
          out.push({ key: `sd${bi}`, kind: 'line', color, size: 3, points: [{ x: xb - 1e-6, y: (s.mean - s.std) * d.scale }, { x: xb + 1e-6, y: (s.mean + s.std) * d.scale }] });
        }
      }
    });
    const span = [{ x: 0.5, y: 0 }, { x: n + 0.5, y: 0 }];
    // Invisible anchor: every chosen batch keeps its slot on the x axis, data or not.
    const anyValue = batches.flatMap((b) => b.stats[param]?.devices ?? [])[0]?.value;
    if (anyValue !== undefined) out.push({ key: 'anchor', kind: 'line', color: 'rgba(0,0,0,0)', size: 0.1, points: span.map((p) => ({ x: p.x, y: anyValue * d.scale })) });
    if (spec?.min != null) out.push({ key: 'specMin', kind: 'line', color: colors.ok, size: 1.5, points: span.map((p) => ({ x: p.x, y: spec.min! * d.scale })) });
    if (spec?.max != null) out.push({ key: 'specMax', kind: 'line', color: colors.ok, size: 1.5, points: span.map((p) => ({ x: p.x, y: spec.max! * d.scale })) });
    return out;
  }, [batches, param, d, spec]);
  const hasData = batches.some((b) => (b.stats[param]?.devices.length ?? 0) > 0);
  return (
    <ChartCard
      title="Per device"
      testID={`compare-chart-${param}`}
      yTitle={`${d.label}${d.unit ? ` [${d.unit}]` : ''}`}
      xTitle={`batch: ${batches.map((b, i) => `${i + 1} = ${b.code}`).join(', ')}`}
      legend={[
        ...batches.map((b, i) => ({ label: b.code, color: BATCH_COLORS[i % BATCH_COLORS.length], shape: 'dot' as const })),
        { label: 'mean, ± sd bar', color: colors.inkSoft, shape: 'line' as const },
        { label: 'outlier (|robust z| > 3.5)', color: colors.danger, shape: 'ring' as const },
        ...(spec ? [{ label: 'spec window', color: colors.ok, shape: 'line' as const }] : []),
      ]}
    >
      {hasData ? <XYChartLazy series={series} height={wide ? 220 : 180} xDecimals={1} testID={`compare-plot-${param}`} /> : <Text variant="small">No device of these batches has this parameter.</Text>}
    </ChartCard>
  );
}

function ParamSection({ data, param, wide, lead }: { data: BatchComparison; param: string; wide: boolean; lead: boolean }) {
  const d = display(param, data.units[param]);
  // The server lists every parameter; both bounds null means no window.
  const w = data.specWindows[param];
  const spec = w && (w.min !== null || w.max !== null) ? w : undefined;
  const [editing, setEditing] = useState(false);
  return (
    <Card
      title={`${d.label}${d.unit ? ` [${d.unit}]` : ''}`}
      testID={`compare-section-${param}`}
      aside={lead && !editing ? <Button small kind="ghost" label={spec ? 'Edit spec' : 'Set spec window'} testID={`spec-edit-${param}`} onPress={() => setEditing(true)} /> : null}
    >
      <Text variant="small" testID={`spec-shown-${param}`}>
        {spec ? `Spec window: ${spec.min != null ? num(spec.min, d) : '−∞'} … ${spec.max != null ? num(spec.max, d) : '+∞'}${d.unit ? ` ${d.unit}` : ''}` : 'No spec window.'}
      </Text>
      {editing ? <SpecWindowForm param={param} d={d} current={spec} onDone={() => setEditing(false)} /> : null}
      {wide ? <StatsTable batches={data.batches} param={param} d={d} /> : <StatsCards batches={data.batches} param={param} d={d} />}
      <ParamChart batches={data.batches} param={param} d={d} spec={spec} wide={wide} />
      <DeviceValues batches={data.batches} param={param} d={d} />
    </Card>
  );
}

export function CompareView() {
  const wide = useIsWide();
  const { user, token } = useSession();
  const batches = useBatches();
  const [params, setParams] = useState<string[]>(DEFAULT_PARAMS);
  const [chosen, setChosen] = useState<number[] | null>(null);
  const [csvBusy, setCsvBusy] = useState(false);
  const [csvError, setCsvError] = useState<string | null>(null);
  const [csvDone, setCsvDone] = useState<string | null>(null);
  useEffect(() => {
    if (chosen === null && batches.data) setChosen(batches.data.slice(0, 2).map((b) => b.id));
  }, [batches.data, chosen]);
  const query: CompareQuery = { params: COMPARE_PARAMS.filter((p) => params.includes(p)), batches: (chosen ?? []).slice().sort((a, b) => a - b) };
  const cmp = useBatchComparison(query);
  const lead = user?.role === 'lab_lead';

  const csv = () => {
    setCsvError(null);
    setCsvDone(null);
    setCsvBusy(true);
    downloadWithToken(compareCsvUrl(query), token, 'batch-comparison.csv')
      .then((name) => setCsvDone(name))
      .catch((e: unknown) => setCsvError(errorMessage(e)))
      .finally(() => setCsvBusy(false));
  };

  return (
    <View style={{ gap: space.lg }} testID="batch-compare">
      <Text variant="heading" role="heading" aria-level={2}>
        Compare batches
      </Text>
      {batches.isPending ? (
        <LoadingState label="Loading batches…" />
      ) : batches.isError ? (
        <ErrorState error={batches.error} onRetry={() => void batches.refetch()} />
      ) : batches.data.length === 0 ? (
        <EmptyState title="No batches to compare" />
      ) : (
        <Card testID="compare-controls">
          <ToggleChips label="Batches" options={batches.data.map((b) => ({ value: String(b.id), label: b.code }))} value={(chosen ?? []).map(String)} onChange={(v) => setChosen(v.map(Number))} testID="compare-batch" />
          <ToggleChips label="Parameters" options={COMPARE_PARAMS.map((p) => ({ value: p, label: CHIP_LABELS[p] }))} value={params} onChange={setParams} testID="compare-param" />
          <Text variant="caption">Devices with an accepted calibration are compared. Outliers: |0.6745·(x − median)/MAD| &gt; 3.5 within the batch (Iglewicz &amp; Hoaglin).</Text>
          {Platform.OS === 'web' ? (
            <View style={{ flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' }}>
              <Button small kind="secondary" label="Download CSV" testID="compare-csv" busy={csvBusy} disabled={query.params.length === 0 || query.batches.length === 0} onPress={csv} />
              {csvDone ? <Text variant="caption" testID="compare-csv-done">{`Saved ${csvDone}`}</Text> : null}
            </View>
          ) : null}
          {csvError ? <Notice tone="error">{csvError}</Notice> : null}
        </Card>
      )}
      {query.batches.length === 0 || query.params.length === 0 ? (
        batches.data ? <EmptyState title="Choose batches and parameters" body="Pick at least one batch and one parameter to compare." /> : null
      ) : cmp.isPending ? (
        <LoadingState label="Comparing batches…" />
      ) : cmp.isError ? (
        <ErrorState error={cmp.error} onRetry={() => void cmp.refetch()} />
      ) : cmp.data.batches.every((b) => b.count === 0) ? (
        <EmptyState title="Nothing calibrated yet" body="None of the chosen batches has a device with an accepted calibration." />
      ) : (
        <View style={{ gap: space.lg, opacity: cmp.isFetching ? 0.7 : 1 }} testID="compare-results">
          {cmp.data.params.map((p) => (
            <ParamSection key={p} data={cmp.data} param={p} wide={wide} lead={lead} />
          ))}
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  chip: { paddingHorizontal: space.md, minHeight: 32, justifyContent: 'center', borderRadius: radius.sm, borderWidth: 1, borderColor: colors.ruleStrong, backgroundColor: colors.sheet },
  chipOn: { backgroundColor: colors.ink, borderColor: colors.ink },
  chipText: { fontFamily: fonts.sansMedium, fontSize: 13, color: colors.ink },
  table: { borderWidth: 1, borderColor: colors.rule, borderRadius: radius.md, backgroundColor: colors.sheet, overflow: 'hidden' },
  tr: { flexDirection: 'row', borderTopWidth: 1, borderTopColor: colors.rule, paddingHorizontal: space.sm, alignItems: 'center' },
  thead: { borderTopWidth: 0, backgroundColor: '#EFEBE1' },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.sm, minWidth: 0, flex: 1 },
  num: { textAlign: 'right' },
  statCard: { borderWidth: 1, borderColor: colors.rule, borderRadius: radius.sm, padding: space.sm, gap: 2, backgroundColor: colors.sheet },
  devLine: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap', paddingVertical: 6, paddingHorizontal: space.xs, borderTopWidth: 1, borderTopColor: colors.rule },
  swatch: { width: 8, height: 8, borderRadius: 4 },
});

