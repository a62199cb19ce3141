import React from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space } from '../theme';
import { Card } from '../ui/Card';
import { ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { dbm, fixed, phi0, sci } from './format';
import type { RankResult } from './types';

/** Suggested operating points (server scan of the calibrated range); a tap moves the slider there. */
export const RankedPoints = React.memo(function RankedPoints({
  ranking,
  loading,
  error,
  onRetry,
  biasUnit,
  currentBias,
  onPick,
}: {
  ranking: RankResult | undefined;
  loading: boolean;
  error: unknown;
  onRetry: () => void;
  biasUnit: string;
  currentBias: number;
  onPick: (bias: number) => void;
}) {
  return (
    <Card title="Suggested operating points" testID="plan-ranked">
      {loading && !ranking ? (
        <LoadingState label="Scanning the calibrated range…" />
      ) : error && !ranking ? (
        <ErrorState error={error} onRetry={onRetry} title="Could not rank operating points" />
      ) : !ranking || ranking.points.length === 0 ? (
        <Text variant="small" testID="plan-ranked-empty">
          No feasible operating point for this target in the calibrated range
          {ranking && Object.keys(ranking.refused).length
            ? ` (refused: ${Object.entries(ranking.refused).map(([k, n]) => `${k} ×${n}`).join(', ')})`
            : ''}
          .
        </Text>
      ) : (
        <>
          <Text variant="small">
            {ranking.feasible} of {ranking.scanned} scanned biases are feasible. Score weighs pump power, threshold margin, flux-noise
            sensitivity and Q_i. Tap one to move the bias there.
          </Text>
          <View style={{ gap: space.xs }}>
            {ranking.points.map((p) => {
              const on = Math.abs(p.bias - currentBias) < 1e-9 * Math.max(1, Math.abs(p.bias));
              return (
                <Pressable
                  key={p.rank}
                  onPress={() => onPick(p.bias)}
                  style={({ hovered }: { hovered?: boolean }) => [styles.row, hovered && { borderColor: colors.ink }, on && styles.rowOn]}
                  role="button"
                  aria-label={`Use operating point ${p.rank}: bias ${fixed(p.bias, 5)} ${biasUnit}`}
                  testID={`plan-ranked-${p.rank}`}
                >
                  <Text style={styles.rank}>{p.rank}</Text>
                  <View style={{ flex: 1, gap: 2 }}>
                    <Text variant="mono">
                      {fixed(p.bias, 5)} {biasUnit} · Φ {fixed(p.operating_flux_phi0, 4)} Φ0
                    </Text>
                    <Text variant="monoSmall">
                      δΦ {phi0(p.plan.pump_amplitude_phi0)}
                      {p.plan.generator_power_dbm !== null ? ` · ${dbm(p.plan.generator_power_dbm)}` : ''}
                      {p.plan.threshold_ratio !== null ? ` · δΦ/δΦ_th ${p.plan.threshold_ratio.toFixed(2)}` : ''}
                    </Text>
                    <Text variant="caption" numberOfLines={2}>
                      {p.reasons.slice(1).join(' · ')}
                    </Text>
                  </View>
                  <Text variant="monoSmall">score {sci(p.score, 2)}</Text>
                </Pressable>
              );
            })}
          </View>
        </>
      )}
    </Card>
  );
});

const styles = StyleSheet.create({
  row: {
    flexDirection: 'row',
    gap: space.md,
    alignItems: 'center',
    padding: space.sm,
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radius.sm,
    backgroundColor: colors.sheet,
  },
  rowOn: { borderColor: colors.accent, backgroundColor: colors.accentWash },
  rank: { fontFamily: fonts.monoMedium, fontSize: 18, width: 22, textAlign: 'center', color: colors.accent },
});
