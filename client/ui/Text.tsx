import React from 'react';
import { Text as RNText, type TextProps, StyleSheet } from 'react-native';
import { colors, fonts } from '../theme';

type Variant = 'body' | 'small' | 'label' | 'title' | 'heading' | 'mono' | 'monoSmall' | 'caption';

export function Text({ variant = 'body', style, ...rest }: TextProps & { variant?: Variant }) {
  return <RNText {...rest} style={[styles.base, styles[variant], style]} />;
}

/** A number with its unit, set in the mono face so columns of values line up. */
export function Quantity({ children, style, ...rest }: TextProps) {
  return (
    <RNText {...rest} style={[styles.base, styles.mono, style]}>
      {children}
    </RNText>
  );
}

const styles = StyleSheet.create({
  base: { color: colors.ink, fontFamily: fonts.sans, fontSize: 15, lineHeight: 22 },
  body: {},
  small: { fontSize: 13, lineHeight: 18, color: colors.inkSoft },
  caption: { fontSize: 12, lineHeight: 16, color: colors.inkFaint, letterSpacing: 0.3 },
  label: {
    fontFamily: fonts.sansMedium,
    fontSize: 12,
    lineHeight: 16,
    letterSpacing: 0.8,
    textTransform: 'uppercase',
    color: colors.inkSoft,
  },
  title: { fontFamily: fonts.sansSemiBold, fontSize: 24, lineHeight: 30, letterSpacing: -0.2 },
  heading: { fontFamily: fonts.sansSemiBold, fontSize: 17, lineHeight: 24 },
  mono: { fontFamily: fonts.mono, fontSize: 14, lineHeight: 20 },
  monoSmall: { fontFamily: fonts.mono, fontSize: 12, lineHeight: 16, color: colors.inkSoft },
});
