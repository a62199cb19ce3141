import React from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';
import { colors, fonts, radius, space } from '../theme';
import { Text } from './Text';

interface TextFieldProps extends Omit<TextInputProps, 'style'> {
  label: string;
  error?: string | null;
  hint?: string;
  mono?: boolean;
}

export function TextField({ label, error, hint, mono, testID, ...input }: TextFieldProps) {
  return (
    <View style={styles.wrap}>
      <Text variant="label">{label}</Text>
      <TextInput
        {...input}
        testID={testID}
        aria-label={label}
        aria-invalid={error ? true : undefined}
        placeholderTextColor={colors.inkFaint}
        style={[styles.input, mono && { fontFamily: fonts.mono }, error ? styles.inputError : null]}
      />
      {error ? (
        <Text variant="small" style={{ color: colors.danger }} role="alert">
          {error}
        </Text>
      ) : hint ? (
        <Text variant="caption">{hint}</Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  input: {
    minHeight: 42,
    borderWidth: 1,
    borderColor: colors.ruleStrong,
    borderRadius: radius.sm,
    backgroundColor: colors.sheet,
    paddingHorizontal: space.md,
    paddingVertical: space.sm,
    fontFamily: fonts.sans,
    fontSize: 15,
    color: colors.ink,
  },
  inputError: { borderColor: colors.danger },
});
