import React from 'react';
import { ActivityIndicator, Pressable, StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space } from '../theme';
import { Text } from './Text';

type Kind = 'primary' | 'secondary' | 'ghost' | 'danger';

interface ButtonProps {
  label: string;
  onPress?: () => void;
  kind?: Kind;
  disabled?: boolean;
  busy?: boolean;
  testID?: string;
  accessibilityLabel?: string;
  small?: boolean;
}

export function Button({ label, onPress, kind = 'primary', disabled, busy, testID, accessibilityLabel, small }: ButtonProps) {
  const inactive = disabled || busy;
  return (
    <Pressable
      testID={testID}
      role="button"
      aria-label={accessibilityLabel ?? label}
      aria-disabled={inactive || undefined}
      disabled={inactive}
      onPress={onPress}
      style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [
        styles.base,
        small && styles.small,
        styles[kind],
        hovered && !inactive && styles[`${kind}Hover` as const],
        pressed && !inactive && { opacity: 0.8 },
        inactive && styles.disabled,
      ]}
    >
      <View style={styles.row}>
        {busy ? <ActivityIndicator size="small" color={kind === 'primary' || kind === 'danger' ? colors.accentInk : colors.ink} /> : null}
        <Text style={[styles.text, small && styles.smallText, styles[`${kind}Text` as const]]}>{label}</Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: 40,
    paddingHorizontal: space.lg,
    borderRadius: radius.sm,
    borderWidth: 1,
    alignItems: 'center',
    justifyContent: 'center',
  },
  small: { minHeight: 30, paddingHorizontal: space.md },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  text: { fontFamily: fonts.sansMedium, fontSize: 15 },
  smallText: { fontSize: 13 },
  primary: { backgroundColor: colors.ink, borderColor: colors.ink },
  primaryHover: { backgroundColor: '#2C3747' },
  primaryText: { color: colors.accentInk },
  secondary: { backgroundColor: colors.sheet, borderColor: colors.ruleStrong },
  secondaryHover: { borderColor: colors.ink },
  secondaryText: { color: colors.ink },
  ghost: { backgroundColor: 'transparent', borderColor: 'transparent' },
  ghostHover: { backgroundColor: colors.accentWash },
  ghostText: { color: colors.accent },
  danger: { backgroundColor: colors.danger, borderColor: colors.danger },
  dangerHover: { backgroundColor: '#862320' },
  dangerText: { color: colors.accentInk },
  disabled: { opacity: 0.5 },
});
