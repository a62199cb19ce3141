import React from 'react';
import { ScrollView, StyleSheet, View, type ViewStyle } from 'react-native';
import Head from 'expo-router/head';
import { colors, space } from '../theme';
import { Text } from './Text';
import { useIsWide } from './useLayout';

interface ScreenProps {
  title?: string;
  subtitle?: string;
  /** Right-aligned actions beside the title (buttons). */
  actions?: React.ReactNode;
  children: React.ReactNode;
  testID?: string;
  /** No own scroll view (for panes that manage scrolling themselves). */
  fixed?: boolean;
  maxWidth?: number;
  style?: ViewStyle;
}

/** One screen's page: title row, then content, centred up to a comfortable reading width. */
export function Screen({ title, subtitle, actions, children, testID, fixed, maxWidth = 960, style }: ScreenProps) {
  const wide = useIsWide();
  const pad = wide ? space.xxl : space.lg;
  const body = (
    <View style={[styles.inner, { padding: pad, maxWidth }, style]}>
      {title ? (
        <Head>
          <title>{`${title} · Fluxwright`}</title>
        </Head>
      ) : null}
      {title ? (
        <View style={styles.titleRow}>
          <View style={{ flexShrink: 1, flexGrow: 1 }}>
            <Text variant="title" role="heading" aria-level={1}>
              {title}
            </Text>
            {subtitle ? (
              <Text variant="small" style={{ marginTop: 2 }}>
                {subtitle}
              </Text>
            ) : null}
          </View>
          {actions ? <View style={styles.actions}>{actions}</View> : null}
        </View>
      ) : null}
      {children}
    </View>
  );
  if (fixed) {
    return (
      <View testID={testID} style={styles.fill}>
        {body}
      </View>
    );
  }
  return (
    <ScrollView testID={testID} style={styles.fill} contentContainerStyle={{ flexGrow: 1 }}>
      {body}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1, backgroundColor: colors.paper },
  inner: { width: '100%', alignSelf: 'center', gap: space.lg },
  titleRow: { flexDirection: 'row', alignItems: 'flex-start', gap: space.md, flexWrap: 'wrap' },
  actions: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
});
