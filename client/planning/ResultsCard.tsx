import React from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space } from '../theme';
import { Card, Field, Rule } from '../ui/Card';
import { Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { RF_CAUTION } from './caution';
import { bandDigits, bandText, dbm, fixed, hz, phi0, rate, ratio, sci, watts } from './format';
import { ThresholdGauge } from './ThresholdGauge';
import type { PlanResult } from './types';

export interface Refusal {
  code: string;
  message: string;
  option?: string;
}

/** One big figure with its label (the headline numbers of a plan). */
export function Figure({ label, value, sub, testID, tone, bare }: { label: string; value: string; sub?: string; testID?: string; tone?: 'danger'; bare?: boolean }) {
  return (
    <View style={bare ? { gap: 2 } : styles.figure}>
      <Text variant="caption">{label}</Text>
      <Text style={[styles.figureValue, tone === 'danger' && { color: colors.danger }]} testID={testID} numberOfLines={2}>
        {value}
      </Text>
      {sub ? <Text variant="monoSmall">{sub}</Text> : null}
    </View>
  );
}

export function PowerFigure({ result, onSetPumpLine }: { result: PlanResult | null; onSetPumpLine?: () => void }) {
  const power = result?.generator_power_dbm ?? null;
  return (
    <View style={[styles.figure, { gap: space.xs }]}>
      <Figure
        bare
        label="Generator power"
        value={power !== null ? dbm(power) : result ? 'set a pump line' : '—'}
        sub={result?.power_at_chip_dbm !== null && result?.power_at_chip_dbm !== undefined ? `at chip ${dbm(result.power_at_chip_dbm)}` : undefined}
        testID="plan-generator-power"
      />
      {result && power === null ? (
        <Text variant="small" testID="plan-power-howto">
          The power needs the device&apos;s pump line: its dc flux period (A per Φ0) and the attenuators down to the chip, or a measured
          threshold power.{' '}
          {onSetPumpLine ? (
            <Text variant="small" style={{ color: colors.accent, textDecorationLine: 'underline' }} onPress={onSetPumpLine} role="link" testID="plan-set-pump-line">
              Set the pump line
            </Text>
          ) : null}
        </Text>
      ) : null}
    </View>
  );
}

export function CautionBlock({ result }: { result: PlanResult | null }) {
  return (
    <View style={styles.caution} testID="plan-caution" role="note">
      {result?.caution ? (
        <Text variant="small" style={{ color: colors.danger, fontFamily: fonts.sansMedium }} testID="plan-caution-estimate">
          {result.caution.text}
        </Text>
      ) : null}
      <Text variant="small" style={{ color: colors.ink }}>
        {RF_CAUTION}
      </Text>
    </View>
  );
}

/** The plan's outputs: headline figures, the threshold gauge, and the full list below a rule. */
export function ResultsCard({
  result,
  refusal,
  onSetPumpLine,
  timing,
  title = 'Plan',
}: {
  result: PlanResult | null;
  refusal?: Refusal | null;
  onSetPumpLine?: () => void;
  timing?: React.ReactNode;
  title?: string;
}) {
  const u = result?.uncertainty ?? null;
  const cavity = result?.mode === 'cavity';
  return (
    <Card title={title} aside={timing} testID="plan-results">
      {refusal ? (
        <Notice tone="error" testID="plan-refusal">
          {`${refusal.code === 'above_threshold' ? 'Above threshold' : 'Not plannable'}: ${refusal.message}`}
        </Notice>
      ) : null}
      <View style={styles.figures}>
        <Figure label="Pump frequency" value={result ? hz(result.pump_frequency_hz, 7) : '—'} sub={result?.resonance_hz ? `f_r ${hz(result.resonance_hz, 7)}` : undefined} testID="plan-pump-frequency" />
        <Figure label="Pump amplitude δΦ" value={result ? phi0(result.pump_amplitude_phi0) : '—'} testID="plan-amplitude" />
        <PowerFigure result={result} onSetPumpLine={onSetPumpLine} />
        <Figure
          label="Predicted pair rate"
          value={result ? rate(result.predicted_pair_rate) : '—'}
          sub={u ? `16–84 %: ${bandText(u.pair_rate_p16, u.pair_rate_p50, u.pair_rate_p84)}` : result ? 'no uncertainty' : undefined}
          testID="plan-pair-rate"
        />
      </View>
      {u ? (
        <Text variant="monoSmall" testID="plan-pair-band">
          {`p16 ${sci(u.pair_rate_p16, bandDigits(u.pair_rate_p16, u.pair_rate_p50, u.pair_rate_p84))} · p50 ${sci(u.pair_rate_p50, bandDigits(u.pair_rate_p16, u.pair_rate_p50, u.pair_rate_p84))} · p84 ${sci(u.pair_rate_p84, bandDigits(u.pair_rate_p16, u.pair_rate_p50, u.pair_rate_p84))} /s (${u.draws - u.rejected} of ${u.draws} draws)`}
        </Text>
      ) : null}
      <View style={{ gap: space.xs }}>
        <View style={{ flexDirection: 'row', justifyContent: 'space-between', flexWrap: 'wrap', gap: space.sm }}>
          <Text variant="label">Threshold margin</Text>
          <Text variant="mono" testID="plan-threshold-ratio" style={refusal?.code === 'above_threshold' || (result?.threshold_ratio ?? 0) > 0.9 ? { color: colors.danger } : undefined}>
            {cavity
              ? `δΦ/δΦ_th ${ratio(result?.threshold_ratio ?? null)} · δω/κ ${ratio(result?.drive_ratio ?? null)}`
              : refusal?.code === 'above_threshold'
                ? 'above threshold'
                : result
                  ? 'line mode: no threshold'
                  : '—'}
          </Text>
        </View>
        {cavity || refusal?.code === 'above_threshold' ? <ThresholdGauge ratio={result?.threshold_ratio ?? null} refused={refusal?.code === 'above_threshold'} /> : null}
      </View>
      <CautionBlock result={result} />
      {result ? (
        <>
          <Rule />
          <Field label="Operating flux" value={`${fixed(result.operating_flux_phi0, 5)} Φ0`} mono testID="plan-flux" />
          <Field label="Operating bias" value={result.operating_bias !== null ? fixed(result.operating_bias, 6) : '—'} mono testID="plan-bias-out" />
          {cavity ? (
            <>
              <Field label="Resonance f_r" value={hz(result.resonance_hz, 8)} mono />
              <Field label="Pump shift of f_r" value={hz(result.pump_frequency_shift_hz, 3)} mono />
              <Field label="Detuning Δ/2π" value={hz(result.detuning_hz, 3)} mono />
              <Field label="Threshold δΦ_th" value={phi0(result.threshold_amplitude_phi0)} mono />
              <Field label="Linewidth κ/2π" value={hz(result.kappa_over_2pi_hz, 4)} mono />
              <Field label="Q_l · Q_c · Q_i" value={`${sci(result.ql)} · ${sci(result.qc)} · ${sci(result.qi)} (${result.q_source ?? '—'})`} mono testID="plan-q-used" />
              <Field label="Slope df_r/dΦ" value={`${hz(result.slope_hz_per_phi0, 4)}/Φ0`} mono />
              <Field label="Gain at f_p/2" value={result.gain_db !== null ? `${result.gain_db.toFixed(2)} dB` : '—'} mono />
              <Field label="Intracavity photons" value={sci(result.intracavity_photons)} mono />
            </>
          ) : (
            <>
              <Field label="δτ_eff" value={`${sci(result.delta_tau_s)} s`} mono />
              <Field label="v_eff/v" value={sci(result.veff_over_v)} mono />
              <Field label="Total photon rate" value={rate(result.total_photon_rate)} mono />
              <Field label="Both partners in band" value={rate(result.both_in_band_pair_rate)} mono />
              <Field label="Band" value={result.band_hz ? `${hz(result.band_hz.low, 4)} – ${hz(result.band_hz.high, 4)}` : '—'} mono />
            </>
          )}
          <Field label="Photon rate" value={rate(result.photon_rate)} mono />
          <Field label="Thermal n_th" value={`${sci(result.n_thermal)} at ${fixed(result.temperature_k * 1e3, 3)} mK`} mono />
          {result.pump_current_a !== null ? <Field label="Pump current (peak)" value={`${sci(result.pump_current_a * 1e6)} µA`} mono /> : null}
          {result.stage_dissipation?.map((s) => (
            <Field key={s.stage} label={`Dissipated at ${s.stage}`} value={`${watts(s.dissipated_w)} (${s.attenuation_db} dB)`} mono />
          ))}
        </>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  figure: { flexGrow: 1, flexBasis: 150, minWidth: 140, gap: 2 },
  figureValue: { fontFamily: fonts.monoMedium, fontSize: 17, lineHeight: 24, color: colors.ink },
  caution: { borderLeftWidth: 3, borderLeftColor: colors.accent, backgroundColor: colors.accentWash, borderRadius: radius.sm, padding: space.sm, gap: space.xs },
});
