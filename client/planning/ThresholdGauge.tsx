import React from 'react';
import { StyleSheet, View } from 'react-native';
import { NEAR_THRESHOLD_RATIO } from '@/calibration/planner';
import { colors, fonts, radius, space } from '../theme';
import { Text } from '../ui/Text';

/** Gauge span: 0 … 1.2 × threshold, so the threshold line sits at 5/6 of the bar. */
const SPAN = 1.2;

/**
 * Drive against the parametric-oscillation threshold: the bar is δΦ/δΦ_th (equal to δω/κ on
 * resonance), the threshold is the line at 1 and the zone above NEAR_THRESHOLD_RATIO is shaded.
 */
export function ThresholdGauge({ ratio, refused, compact, testID = 'threshold-gauge' }: { ratio: number | null; refused?: boolean; compact?: boolean; testID?: string }) {
  const x = refused ? SPAN : ratio ?? 0;
  const fill = Math.max(0, Math.min(1, x / SPAN));
  const near = refused || (ratio !== null && ratio > NEAR_THRESHOLD_RATIO);
  const h = compact ? 8 : 12;
  return (
    <View style={{ gap: 4 }} testID={testID} role="meter" aria-valuemin={0} aria-valuemax={SPAN} aria-valuenow={ratio ?? undefined} aria-label="Drive relative to the oscillation threshold">
      <View style={[styles.track, { height: h }]}>
        <View style={[styles.zone, { left: `${(NEAR_THRESHOLD_RATIO / SPAN) * 100}%`, width: `${((1 - NEAR_THRESHOLD_RATIO) / SPAN) * 100}%` }]} />
        <View style={[styles.fill, { width: `${fill * 100}%`, backgroundColor: near ? colors.danger : colors.accent }]} testID={`${testID}-fill`} />
        <View style={[styles.threshold, { left: `${(1 / SPAN) * 100}%` }]} />
      </View>
      {compact ? null : (
        <View style={styles.scale}>
          <Text style={styles.tick}>0</Text>
          <Text style={[styles.tick, { position: 'absolute', left: `${(0.5 / SPAN) * 100}%`, transform: [{ translateX: -8 }] }]}>0.5</Text>
          <Text style={[styles.tick, { position: 'absolute', left: `${(NEAR_THRESHOLD_RATIO / SPAN) * 100}%`, transform: [{ translateX: -8 }], color: colors.danger }]}>0.9</Text>
          <Text style={[styles.tick, { position: 'absolute', left: `${(1 / SPAN) * 100}%`, transform: [{ translateX: -4 }], color: colors.ink }]}>1</Text>
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  track: { borderRadius: radius.sm, backgroundColor: '#ECE8DE', overflow: 'hidden', position: 'relative' },
  zone: { position: 'absolute', top: 0, bottom: 0, backgroundColor: colors.dangerWash },
  fill: { position: 'absolute', left: 0, top: 0, bottom: 0, opacity: 0.9 },
  threshold: { position: 'absolute', top: 0, bottom: 0, width: 2, marginLeft: -1, backgroundColor: colors.ink },
  scale: { height: 14, position: 'relative', marginBottom: space.xs },
  tick: { fontFamily: fonts.mono, fontSize: 10, lineHeight: 14, color: colors.inkFaint },
});
