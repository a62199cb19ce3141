import React from 'react';
import { StyleSheet, View, type ViewProps } from 'react-native';
import { colors, radius, space } from '../theme';
import { Text } from './Text';
import { useIsWide } from './useLayout';

export function Card({ title, aside, children, style, ...rest }: ViewProps & { title?: string; aside?: React.ReactNode }) {
  return (
    <View {...rest} style={[styles.card, style]}>
      {title ? (
        <View style={styles.head}>
          <Text variant="label" role="heading" aria-level={2} style={{ flexShrink: 1 }}>
            {title}
          </Text>
          {aside}
        </View>
      ) : null}
      {children}
    </View>
  );
}

/** A label/value line inside a card; the value is mono when it is a quantity. */
export function Field({ label, value, mono, testID }: { label: string; value: React.ReactNode; mono?: boolean; testID?: string }) {
  // Side by side on wide screens; stacked on phones so long values (e-mail addresses) keep their line.
  const wide = useIsWide();
  return (
    <View style={wide ? styles.field : styles.fieldStacked} testID={testID}>
      <Text variant="small" style={wide ? styles.fieldLabel : undefined}>
        {label}
      </Text>
      {typeof value === 'string' || typeof value === 'number' ? (
        <Text variant={mono ? 'mono' : 'body'} style={styles.fieldValue}>
          {value}
        </Text>
      ) : (
        <View style={styles.fieldValueBox}>{value}</View>
      )}
    </View>
  );
}

export function Rule() {
  return <View style={styles.rule} />;
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.sheet,
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radius.md,
    padding: space.lg,
    gap: space.md,
  },
  head: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm },
  field: { flexDirection: 'row', alignItems: 'baseline', gap: space.md, flexWrap: 'wrap' },
  fieldStacked: { gap: 2 },
  fieldLabel: { width: 150, flexShrink: 0 },
  fieldValue: { flexShrink: 1, flexGrow: 1 },
  fieldValueBox: { flexShrink: 1, flexGrow: 1 },
  rule: { height: 1, backgroundColor: colors.rule, alignSelf: 'stretch' },
});
