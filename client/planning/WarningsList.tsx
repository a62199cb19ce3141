import React from 'react';
import { View } from 'react-native';
import { colors, space } from '../theme';
import { Card } from '../ui/Card';
import { Text } from '../ui/Text';
import type { PlanWarning } from './types';

const SERIOUS = new Set(['near_threshold', 'beyond_linear_response', 'near_lobe_edge', 'hysteretic_squid', 'cold_stage_power']);

export function WarningsList({ warnings }: { warnings: PlanWarning[] }) {
  return (
    <Card title={`Warnings (${warnings.length})`} testID="plan-warnings">
      {warnings.length === 0 ? (
        <Text variant="small" testID="plan-warnings-none">
          None: the operating point is inside the planner&apos;s comfort zone.
        </Text>
      ) : (
        warnings.map((w, i) => (
          <View key={`${w.code}-${i}`} style={{ flexDirection: 'row', gap: space.sm }} testID={`plan-warning-${w.code}`}>
            <View style={{ width: 6, height: 6, borderRadius: 3, marginTop: 7, backgroundColor: SERIOUS.has(w.code) ? colors.danger : colors.pending }} />
            <View style={{ flex: 1, gap: 2 }}>
              <Text variant="monoSmall" style={{ color: SERIOUS.has(w.code) ? colors.danger : colors.pending }}>
                {w.code}
              </Text>
              <Text variant="small">{w.message}</Text>
            </View>
          </View>
        ))
      )}
    </Card>
  );
}
