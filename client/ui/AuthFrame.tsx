import React from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import Head from 'expo-router/head';
import { colors, fonts, radius, space } from '../theme';
import { Text } from './Text';

/** Centred sheet for the signed-out screens. */
export function AuthFrame({ title, lead, children, testID }: { title: string; lead?: string; children: React.ReactNode; testID?: string }) {
  return (
    <ScrollView style={{ flex: 1, backgroundColor: colors.paper }} contentContainerStyle={styles.outer} testID={testID}>
      <Head>
        <title>{`${title} · Fluxwright`}</title>
      </Head>
      <View style={styles.column}>
        <View style={styles.brandRow}>
          <View style={styles.mark}>
            <View style={styles.markDip} />
          </View>
          <Text style={styles.brand}>Fluxwright</Text>
        </View>
        <Text variant="small" style={{ marginBottom: space.lg }}>
          Calibration and drive planning for flux-tunable resonators
        </Text>
        <View style={styles.sheet}>
          <Text variant="title" role="heading" aria-level={1}>
            {title}
          </Text>
          {lead ? <Text variant="small">{lead}</Text> : null}
          {children}
        </View>
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  outer: { flexGrow: 1, alignItems: 'center', justifyContent: 'center', padding: space.lg },
  column: { width: '100%', maxWidth: 420 },
  brandRow: { flexDirection: 'row', alignItems: 'center', gap: space.sm, marginBottom: space.xs },
  brand: { fontFamily: fonts.sansSemiBold, fontSize: 22, letterSpacing: -0.3 },
  mark: { width: 26, height: 26, borderRadius: 6, backgroundColor: colors.ink, alignItems: 'center', justifyContent: 'center' },
  markDip: { width: 14, height: 7, borderBottomLeftRadius: 7, borderBottomRightRadius: 7, borderWidth: 2, borderTopWidth: 0, borderColor: colors.accent },
  sheet: {
    backgroundColor: colors.sheet,
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radius.lg,
    padding: space.xl,
    gap: space.lg,
  },
});
