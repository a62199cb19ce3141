import React from 'react';
import { View } from 'react-native';
import { colors, space } from '../theme';
import { Card } from '../ui/Card';
import { Text } from '../ui/Text';

export interface LegendItem {
  label: string;
  color: string;
  shape: 'dot' | 'ring' | 'line';
}

function Swatch({ item }: { item: LegendItem }) {
  if (item.shape === 'line') return <View style={{ width: 16, height: 2, backgroundColor: item.color }} />;
  return (
    <View
      style={{
        width: 9,
        height: 9,
        borderRadius: 5,
        backgroundColor: item.shape === 'dot' ? item.color : 'transparent',
        borderWidth: item.shape === 'ring' ? 1.5 : 0,
        borderColor: item.color,
      }}
    />
  );
}

/** A chart with its axis titles (units in brackets) set in the app's type, and a legend. */
export function ChartCard({
  title,
  yTitle,
  xTitle,
  legend,
  children,
  aside,
  testID,
}: {
  title: string;
  yTitle: string;
  xTitle: string;
  legend?: LegendItem[];
  children: React.ReactNode;
  aside?: React.ReactNode;
  testID?: string;
}) {
  return (
    <Card title={title} aside={aside} testID={testID}>
      <Text variant="monoSmall">{yTitle}</Text>
      <View testID={testID ? `${testID}-canvas` : undefined}>{children}</View>
      <Text variant="monoSmall" style={{ textAlign: 'center' }}>
        {xTitle}
      </Text>
      {legend && legend.length ? (
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.md }}>
          {legend.map((l) => (
            <View key={l.label} style={{ flexDirection: 'row', alignItems: 'center', gap: 6 }}>
              <Swatch item={l} />
              <Text variant="caption" style={{ color: colors.inkSoft }}>
                {l.label}
              </Text>
            </View>
          ))}
        </View>
      ) : null}
    </Card>
  );
}
