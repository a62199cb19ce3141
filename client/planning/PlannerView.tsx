// The plan screen: target, bias slider over the calibrated range and conditions on one side, the
// live plan (computed in the client with the shared core) on the other; save posts the request and
// shows what the server stored.
import React, { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { Platform, ScrollView, StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';
import { DEFAULT_DRAWS } from '@/calibration/planner';
import { fluxFromBias } from '@/calibration/squid/model';
import type { CalibrationJson } from '@/shared/api/calibration';
import { ApiError, errorMessage } from '../api/http';
import { useDeviceCalibration } from '../queries/calibration';
import { useDevice } from '../queries/devices';
import { useOperatingPoints, useSavePlan } from '../queries/plans';
import { usePumpLine } from '../queries/pumpLines';
import { useSession } from '../session/SessionProvider';
import { colors, fonts, radius, space } from '../theme';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Choice } from '../ui/Choice';
import { PressableLink } from '../ui/PressableLink';
import { EmptyState, ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { useIsWide } from '../ui/useLayout';
import { bandText, dbm, fixed, hz, rate, sci } from './format';
import { BiasSlider } from './BiasSlider';
import { OperatingPointChart, SpectrumChart } from './PlanCharts';
import { PumpLineCard } from './PumpLineCard';
import { RankedPoints } from './RankedPoints';
import { buildRequest, calibratedRange, fillFromPumpLine, calibrationQ, cavityAllowed, defaultBias, defaultLinePumpGHz, type PlannerInputs } from './request';
import { ResultsCard } from './ResultsCard';
import { ThresholdGauge } from './ThresholdGauge';
import type { Plan, PlanResult } from './types';
import { computePlan, useLivePlan } from './useLivePlan';
import { WarningsList } from './WarningsList';

/** Roles that save plans (API: POST /api/plans). */
export function canPlan(role: string | undefined): boolean {
  return role === 'experimentalist' || role === 'lab_lead';
}

function useDebounced<T>(value: T, ms: number): T {
  const [v, setV] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setV(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return v;
}

const CHART_MS = 120;

/** The value, but while `active` at most one change per `ms` (the latest wins); immediate otherwise. */
function useThrottled<T>(value: T, ms: number, active: boolean): T {
  const [v, setV] = useState(value);
  const last = useRef(0);
  useEffect(() => {
    if (!active) {
      last.current = Date.now();
      setV(value);
      return;
    }
    const wait = Math.max(0, last.current + ms - Date.now());
    const t = setTimeout(() => {
      last.current = Date.now();
      setV(value);
    }, wait);
    return () => clearTimeout(t);
  }, [value, ms, active]);
  return v;
}

/** A step of 1, 2 or 5 × 10^k giving about 1000 positions across the range. */
function sliderStep(lo: number, hi: number): number {
  const raw = (hi - lo) / 1000;
  const e = Math.floor(Math.log10(raw));
  const m = raw / 10 ** e;
  return (m < 2 ? 1 : m < 5 ? 2 : 5) * 10 ** e;
}

function initialInputs(cal: CalibrationJson): PlannerInputs {
  const cavity = cavityAllowed(cal);
  return {
    mode: cavity ? 'cavity' : 'line',
    targetKind: 'rate',
    target: '1e5',
    bias: defaultBias(cal),
    ql: '',
    qc: '',
    temperatureMk: '20',
    bandMHz: '',
    pumpGHz: cavity ? '' : defaultLinePumpGHz(cal),
  };
}

const COMPARED: { key: string; get: (r: PlanResult) => number | null }[] = [
  { key: 'predicted_pair_rate', get: (r) => r.predicted_pair_rate },
  { key: 'pump_amplitude_phi0', get: (r) => r.pump_amplitude_phi0 },
  { key: 'pump_frequency_hz', get: (r) => r.pump_frequency_hz },
  { key: 'generator_power_dbm', get: (r) => r.generator_power_dbm },
  { key: 'pair_rate_p16', get: (r) => r.uncertainty?.pair_rate_p16 ?? null },
  { key: 'pair_rate_p84', get: (r) => r.uncertainty?.pair_rate_p84 ?? null },
];

/** Keys where the server's stored result and the client's differ by more than 1e-9 (relative). */
export function resultDifferences(server: PlanResult, client: PlanResult): string[] {
  return COMPARED.filter(({ get }) => {
    const a = get(server);
    const b = get(client);
    if (a === null || b === null) return a !== b;
    return Math.abs(a - b) > 1e-9 * Math.max(Math.abs(a), Math.abs(b), 1e-300);
  }).map((c) => c.key);
}

function SavedNotice({ plan, differences }: { plan: Plan; differences: string[] }) {
  return (
    <View style={styles.saved} testID="plan-saved">
      <Text variant="heading">Saved as plan #{plan.id}</Text>
      <Text variant="small">
        The server recomputed it on calibration v{plan.fitVersion}: {rate(plan.result.predicted_pair_rate)} at δΦ{' '}
        {sci(plan.result.pump_amplitude_phi0)} Φ0, pump {hz(plan.result.pump_frequency_hz)}
        {plan.result.generator_power_dbm !== null ? `, ${dbm(plan.result.generator_power_dbm)}` : ''}.
      </Text>
      {differences.length === 0 ? (
        <Text variant="small" style={{ color: colors.ok }} testID="plan-server-agrees">
          The stored result equals the live figures (same core, same inputs, same seed).
        </Text>
      ) : (
        <Notice tone="error" testID="plan-server-differs">
          {`The stored result differs from the live figures in ${differences.join(', ')}. The stored plan is what counts; the calibration may have changed while you were planning.`}
        </Notice>
      )}
      <PressableLink href={`/plans/${plan.id}`} testID="plan-open-saved" style={{ alignSelf: 'flex-start' }}>
        <Text style={{ color: colors.accent, fontFamily: fonts.sansMedium }}>Open the plan sheet ›</Text>
      </PressableLink>
    </View>
  );
}

function Planner({ deviceId, deviceName, cal, fitVersion }: { deviceId: number; deviceName: string; cal: CalibrationJson; fitVersion: number | null }) {
  const wide = useIsWide();
  const { user } = useSession();
  const pumpLine = usePumpLine(deviceId);
  const [inputs, setInputs] = useState<PlannerInputs>(() => initialInputs(cal));
  const [dragging, setDragging] = useState(false);
  const [editPumpLine, setEditPumpLine] = useState(false);
  const [showJson, setShowJson] = useState(false);
  const [note, setNote] = useState('');
  const [saved, setSaved] = useState<{ plan: Plan; differences: string[] } | null>(null);
  const scrollRef = useRef<ScrollView>(null);
  const pumpLineY = useRef(0);
  const save = useSavePlan();

  const [lo, hi] = useMemo(() => calibratedRange(cal), [cal]);
  const step = useMemo(() => sliderStep(lo, hi), [lo, hi]);
  const set = useCallback(<K extends keyof PlannerInputs>(k: K, v: PlannerInputs[K]) => setInputs((s) => ({ ...s, [k]: v })), []);
  const setBias = useCallback((b: number) => setInputs((s) => ({ ...s, bias: Math.min(hi, Math.max(lo, b)) })), [lo, hi]);

  const { request, errors } = useMemo(() => buildRequest(inputs), [inputs]);
  // The live plan computes with the request as the server will complete it from the pump line.
  const filled = useMemo(() => (request ? fillFromPumpLine(cal, request, pumpLine.data) : null), [cal, request, pumpLine.data]);
  const live = useLivePlan(cal, filled?.request ?? null, dragging);
  const result = live.result;
  // Charts redraw at most every CHART_MS while dragging (the numbers above them every move), and at
  // once when the slider settles: a chart render costs more than a frame on a phone.
  const chart = useThrottled(useMemo(() => ({ bias: inputs.bias, amp: result?.pump_amplitude_phi0 ?? null, result }), [inputs.bias, result]), CHART_MS, dragging);
  const chartBias = chart.bias;
  const chartAmp = chart.amp;
  const chartResult = chart.result;
  const qCal = useMemo(() => calibrationQ(cal, inputs.bias), [cal, inputs.bias]);
  const phi = fluxFromBias(inputs.bias, cal.params.flux_period?.value ?? 1, cal.params.flux_offset?.value ?? 0);

  const rankQuery = useDebounced(
    useMemo(() => {
      if (!request) return null;
      return {
        mode: request.mode,
        target: request.targetPairRate,
        targetGainDb: request.targetGainDb,
        pumpFrequencyHz: request.pumpFrequencyHz,
        top: 5,
      };
    }, [request?.mode, request?.targetPairRate, request?.targetGainDb, request?.pumpFrequencyHz]), // eslint-disable-line react-hooks/exhaustive-deps
    500,
  );
  const ranking = useOperatingPoints(deviceId, rankQuery);

  const goToPumpLine = () => {
    setEditPumpLine(true);
    scrollRef.current?.scrollTo({ y: Math.max(0, pumpLineY.current - space.lg), animated: true });
  };

  const onSave = () => {
    if (!request) return;
    setSaved(null);
    const body = { deviceId, request, note: note.trim() || undefined };
    // The live figures at the full draw count, for the comparison with what the server stores.
    const client = filled ? computePlan(cal, filled.request, DEFAULT_DRAWS).result : null;
    save.mutate(body, {
      onSuccess: (plan) => {
        setSaved({ plan, differences: client ? resultDifferences(plan.result, client) : ['predicted_pair_rate'] });
        setNote('');
      },
    });
  };

  const timing = (
    <Text variant="monoSmall" testID="plan-compute-ms" aria-live="off">
      {live.ms !== null ? `${live.ms.toFixed(2)} ms · ${live.draws} draws` : '—'}
    </Text>
  );

  const cavityOk = cavityAllowed(cal);
  const targetCard = (
    <Card title="Target" testID="plan-target-card">
      <Choice
        label="Mode"
        value={inputs.mode}
        options={cavityOk ? [{ value: 'cavity', label: 'Cavity' }, { value: 'line', label: 'Line' }] : [{ value: 'line', label: 'Line' }]}
        onChange={(m) =>
          setInputs((s) => ({ ...s, mode: m, targetKind: m === 'line' ? 'rate' : s.targetKind, pumpGHz: m === 'line' && !s.pumpGHz ? defaultLinePumpGHz(cal) : m === 'cavity' ? '' : s.pumpGHz }))
        }
        testID="plan-mode"
      />
      {!cavityOk ? <Text variant="caption">A phase-versus-flux calibration plans the line (broadband) mode only.</Text> : null}
      {inputs.mode === 'cavity' ? (
        <Choice
          label="Target as"
          value={inputs.targetKind}
          options={[{ value: 'rate', label: 'Pair rate' }, { value: 'gain', label: 'Gain' }]}
          onChange={(k) => setInputs((s) => ({ ...s, targetKind: k, target: k === 'gain' ? '10' : '1e5' }))}
          testID="plan-target-kind"
        />
      ) : null}
      <TextField
        label={inputs.mode === 'cavity' && inputs.targetKind === 'gain' ? 'Target gain (dB, at f_p/2)' : 'Target pair rate (pairs/s)'}
        mono
        value={inputs.target}
        onChangeText={(t) => set('target', t)}
        error={errors.target}
        testID="plan-target"
        keyboardType="numbers-and-punctuation"
        inputMode="decimal"
      />
    </Card>
  );

  const liveStrip = (
    <View style={styles.strip} testID="plan-live-strip">
      <View style={styles.stripCell}>
        <Text variant="caption">f_p</Text>
        <Text style={styles.stripValue} testID="live-pump-frequency">{result ? hz(result.pump_frequency_hz, 6) : '—'}</Text>
      </View>
      <View style={styles.stripCell}>
        <Text variant="caption">δΦ</Text>
        <Text style={styles.stripValue} testID="live-amplitude">{result ? `${fixed(result.pump_amplitude_phi0 * 1e3, 3)} mΦ0` : '—'}</Text>
      </View>
      <View style={styles.stripCell}>
        <Text variant="caption">power</Text>
        <Text style={styles.stripValue} testID="live-power">{result?.generator_power_dbm != null ? dbm(result.generator_power_dbm) : '—'}</Text>
      </View>
      <View style={styles.stripCell}>
        <Text variant="caption">pairs/s (16–84 %)</Text>
        <Text style={styles.stripValue} testID="live-rate">
          {result ? sci(result.predicted_pair_rate) : live.refusal ? 'refused' : '—'}
        </Text>
        {result?.uncertainty ? (
          <Text variant="monoSmall" testID="live-rate-band">
            {bandText(result.uncertainty.pair_rate_p16, result.uncertainty.pair_rate_p50, result.uncertainty.pair_rate_p84).replace(/^.*\(/, '(')}
          </Text>
        ) : null}
      </View>
      {inputs.mode === 'cavity' ? (
        <View style={{ flexBasis: '100%', gap: 2 }}>
          <Text variant="caption">{`δΦ/δΦ_th ${result?.threshold_ratio != null ? result.threshold_ratio.toFixed(3) : live.refusal?.code === 'above_threshold' ? '≥ 1' : '—'}`}</Text>
          <ThresholdGauge compact ratio={result?.threshold_ratio ?? null} refused={live.refusal?.code === 'above_threshold'} testID="live-gauge" />
        </View>
      ) : null}
    </View>
  );

  const biasCard = (
    <Card title="Operating bias" testID="plan-bias-card" aside={<Text variant="caption">{`calibrated ${fixed(lo, 4)} … ${fixed(hi, 4)} ${cal.bias_unit}`}</Text>}>
      <Text style={styles.biasValue} testID="plan-bias">
        {`${inputs.bias.toFixed(Math.max(0, -Math.floor(Math.log10(step))))} ${cal.bias_unit}`}
        <Text variant="monoSmall">{`   Φ = ${phi.toFixed(4)} Φ0`}</Text>
      </Text>
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.sm }}>
        <Button small kind="secondary" label="‹" accessibilityLabel="Lower bias" testID="plan-bias-down" onPress={() => setBias(inputs.bias - 5 * step)} />
        <View style={{ flex: 1, minWidth: 0 }} testID="plan-bias-slider-wrap">
          <BiasSlider testID="plan-bias-slider" label="Operating bias" min={lo} max={hi} step={step} value={inputs.bias} onChange={setBias} onDragging={setDragging} />
        </View>
        <Button small kind="secondary" label="›" accessibilityLabel="Raise bias" testID="plan-bias-up" onPress={() => setBias(inputs.bias + 5 * step)} />
      </View>
      {wide ? null : liveStrip}
      <OperatingPointChart cal={cal} bias={chartBias} amplitudePhi0={chartAmp} wide={wide} />
    </Card>
  );

  const qHint = qCal ? `calibration traces at this bias: ${sci(qCal.ql)}` : 'no traces in this calibration: planner default';
  const conditionsCard = (
    <Card title="Conditions" testID="plan-conditions">
      <View style={styles.pair}>
        <View style={styles.pairCell}>
          <TextField label="Q_l (loaded)" mono value={inputs.ql} onChangeText={(t) => set('ql', t)} error={errors.ql} testID="plan-ql" placeholder={qCal ? String(Math.round(qCal.ql)) : '10000'} hint={qHint} inputMode="decimal" />
        </View>
        <View style={styles.pairCell}>
          <TextField label="Q_c (coupling)" mono value={inputs.qc} onChangeText={(t) => set('qc', t)} error={errors.qc} testID="plan-qc" placeholder={qCal ? String(Math.round(qCal.qc)) : '20000'} hint={qCal ? `traces: ${sci(qCal.qc)}` : 'planner default'} inputMode="decimal" />
        </View>
      </View>
      <View style={styles.pair}>
        <View style={styles.pairCell}>
          <TextField label="Temperature (mK)" mono value={inputs.temperatureMk} onChangeText={(t) => set('temperatureMk', t)} error={errors.temperatureMk} testID="plan-temperature" hint="of the input and loss baths" inputMode="decimal" />
        </View>
        <View style={styles.pairCell}>
          <TextField
            label="Detection band (MHz)"
            mono
            value={inputs.bandMHz}
            onChangeText={(t) => set('bandMHz', t)}
            error={errors.bandMHz}
            testID="plan-band"
            placeholder={inputs.mode === 'cavity' ? 'whole output' : 'B = f_p'}
            hint={inputs.mode === 'cavity' ? 'centred on f_p/2' : 'centred on f_p/2'}
            inputMode="decimal"
          />
        </View>
      </View>
      <TextField
        label={inputs.mode === 'line' ? 'Pump frequency (GHz)' : 'Pump frequency (GHz, optional)'}
        mono
        value={inputs.pumpGHz}
        onChangeText={(t) => set('pumpGHz', t)}
        error={errors.pumpGHz}
        testID="plan-pump"
        placeholder={inputs.mode === 'cavity' ? 'chosen: 2 × f_r' : ''}
        hint={inputs.mode === 'cavity' ? 'Leave empty to pump at twice the resonance; a fixed pump detunes as the bias moves.' : 'Photons are emitted below f_p, in pairs around f_p/2.'}
        inputMode="decimal"
      />
    </Card>
  );

  const results = (
    <ResultsCard result={result} refusal={live.refusal} onSetPumpLine={goToPumpLine} timing={timing} title="Live plan" />
  );

  const saveCard = canPlan(user?.role) ? (
    <Card title="Save" testID="plan-save-card">
      <Text variant="small">
        Saving stores the inputs and the server&apos;s own computation with calibration v{fitVersion ?? '?'}; saved plans never change. If
        the device gets a new calibration, the plan says so and offers a re-plan.
      </Text>
      <TextField label="Note (optional)" value={note} onChangeText={setNote} multiline testID="plan-note" placeholder="What this drive is for" />
      {save.isError ? <Notice tone="error">{errorMessage(save.error)}</Notice> : null}
      <View style={{ flexDirection: 'row', gap: space.sm }}>
        <Button label="Save plan" testID="plan-save" onPress={onSave} busy={save.isPending} disabled={!request || !result || dragging} />
      </View>
      {saved ? <SavedNotice plan={saved.plan} differences={saved.differences} /> : null}
    </Card>
  ) : (
    <Text variant="caption" testID="plan-save-not-allowed">
      Experimentalists and the lab lead save plans; you can explore and preview here.
    </Text>
  );

  const jsonCard = (
    <Card
      title="Request (JSON)"
      testID="plan-request-card"
      aside={<Button small kind="ghost" label={showJson ? 'Hide' : 'Show'} testID="plan-request-toggle" onPress={() => setShowJson((x) => !x)} />}
    >
      {showJson ? (
        <View style={{ gap: space.xs }}>
          <Text variant="monoSmall" selectable testID="plan-request-json" style={{ color: colors.ink }}>
            {request ? JSON.stringify(request, null, 2) : 'Fix the inputs above first.'}
          </Text>
          {filled && filled.filled.length ? (
            <Text variant="caption" testID="plan-request-filled">
              {`From the pump line: ${filled.filled.map((k) => `${k} = ${JSON.stringify(filled.request[k as keyof typeof filled.request])}`).join(', ')}`}
            </Text>
          ) : null}
        </View>
      ) : (
        <Text variant="caption">What the planner computes with (and what Save sends), for scripts and the command line.</Text>
      )}
    </Card>
  );

  const pumpCard = (
    <View onLayout={(e) => (pumpLineY.current = e.nativeEvent.layout.y)}>
      <PumpLineCard deviceId={deviceId} startEditing={editPumpLine} />
    </View>
  );

  const ranked = (
    <RankedPoints
      ranking={ranking.data?.ranking}
      loading={ranking.isPending || ranking.isFetching}
      error={ranking.error}
      onRetry={() => void ranking.refetch()}
      biasUnit={cal.bias_unit}
      currentBias={inputs.bias}
      onPick={setBias}
    />
  );

  const header = (
    <View style={{ gap: space.xs }}>
      <PressableLink href={`/devices/${deviceId}`} testID="plan-back-to-device">
        <Text variant="small" style={{ color: colors.accent }}>
          ‹ {deviceName}
        </Text>
      </PressableLink>
      <Text variant="title" role="heading" aria-level={1} testID="plan-title">
        Plan a drive · {deviceName}
      </Text>
      <Text variant="small" testID="plan-calibration-version">
        Calibration v{fitVersion ?? '?'} ({cal.model} model, bias in {cal.bias_unit}) · computed live in this browser with the planner core
      </Text>
    </View>
  );

  return (
    <ScrollView ref={scrollRef} style={{ flex: 1, backgroundColor: colors.paper }} contentContainerStyle={{ flexGrow: 1 }} testID="planner">
      <View style={[styles.page, { padding: wide ? space.xxl : space.lg }]}>
        {header}
        {wide ? (
          <View style={styles.columns}>
            <View style={styles.column}>
              {targetCard}
              {biasCard}
              {conditionsCard}
              {ranked}
              {pumpCard}
            </View>
            <View style={styles.column}>
              {results}
              <SpectrumChart result={chartResult} wide />
              <WarningsList warnings={result?.warnings ?? []} />
              {saveCard}
              {jsonCard}
            </View>
          </View>
        ) : (
          <>
            {targetCard}
            {biasCard}
            {results}
            {saveCard}
            <SpectrumChart result={chartResult} wide={false} />
            <WarningsList warnings={result?.warnings ?? []} />
            {ranked}
            {conditionsCard}
            {pumpCard}
            {jsonCard}
          </>
        )}
        {Platform.OS === 'web' ? null : <View style={{ height: space.xl }} />}
      </View>
    </ScrollView>
  );
}

/** Loads the device and its accepted calibration, then hands over to the planner. */
export function PlannerView({ deviceId }: { deviceId: number }) {
  const device = useDevice(Number.isInteger(deviceId) && deviceId > 0 ? deviceId : undefined);
  const cal = useDeviceCalibration(Number.isInteger(deviceId) && deviceId > 0 ? deviceId : undefined);
  const router = useRouter();
  if (!Number.isInteger(deviceId) || deviceId <= 0) {
    return (
      <EmptyState title="Choose a device to plan for" body="Open a device with an accepted calibration and press Plan a drive.">
        <Button kind="secondary" label="Devices" onPress={() => router.push('/devices')} />
      </EmptyState>
    );
  }
  if (device.isPending || cal.isPending) return <LoadingState label="Loading the device and its calibration…" />;
  if (device.isError) {
    if (device.error instanceof ApiError && device.error.status === 404) return <EmptyState title="No such device" body="It may belong to another lab or have been removed." />;
    return <ErrorState error={device.error} onRetry={() => void device.refetch()} />;
  }
  if (cal.isError) return <ErrorState error={cal.error} onRetry={cal.refetch} />;
  if (!cal.data) {
    return (
      <EmptyState title="No accepted calibration" body={`${device.data.device.name} has no accepted calibration yet: the planner needs one (f0, γ0, d, flux period and offset).`}>
        <Button kind="secondary" label="Open the device" testID="plan-no-calibration-device" onPress={() => router.push(`/devices/${deviceId}`)} />
      </EmptyState>
    );
  }
  // Remount on a new calibration version, so the inputs start from its range.
  return <Planner key={`${deviceId}-${cal.data.fitId ?? 'x'}`} deviceId={deviceId} deviceName={device.data.device.name} cal={cal.data.calibration} fitVersion={cal.data.version} />;
}

const styles = StyleSheet.create({
  page: { width: '100%', maxWidth: 1240, alignSelf: 'center', gap: space.lg },
  columns: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  column: { flex: 1, minWidth: 0, gap: space.lg },
  pair: { flexDirection: 'row', gap: space.md, flexWrap: 'wrap' },
  pairCell: { flexGrow: 1, flexBasis: 140, minWidth: 0 },
  biasValue: { fontFamily: fonts.monoMedium, fontSize: 20, lineHeight: 28, color: colors.ink },
  strip: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: space.sm,
    padding: space.sm,
    borderRadius: radius.sm,
    backgroundColor: '#EFEBE1',
  },
  stripCell: { flexGrow: 1, flexBasis: 140, gap: 0 },
  stripValue: { fontFamily: fonts.monoMedium, fontSize: 15, lineHeight: 20, color: colors.ink },
  saved: { gap: space.xs, borderTopWidth: 1, borderTopColor: colors.rule, paddingTop: space.md },
});

