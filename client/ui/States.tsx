import React from 'react';
import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { errorMessage } from '../api/http';
import { colors, radius, space } from '../theme';
import { Button } from './Button';
import { Text } from './Text';

export function LoadingState({ label = 'Loading…' }: { label?: string }) {
  return (
    <View style={styles.box} testID="loading-state" role="status" aria-live="polite">
      <ActivityIndicator color={colors.accent} />
      <Text variant="small">{label}</Text>
    </View>
  );
}

export function ErrorState({ error, onRetry, title = 'Could not load this' }: { error: unknown; onRetry?: () => void; title?: string }) {
  return (
    <View style={[styles.box, styles.error]} testID="error-state" role="alert">
      <Text variant="heading" style={{ color: colors.danger }}>
        {title}
      </Text>
      <Text variant="small" style={{ textAlign: 'center' }}>
        {errorMessage(error)}
      </Text>
      {onRetry ? <Button kind="secondary" small label="Try again" onPress={onRetry} /> : null}
    </View>
  );
}

export function EmptyState({ title, body, children }: { title: string; body?: string; children?: React.ReactNode }) {
  return (
    <View style={styles.box} testID="empty-state">
      <Text variant="heading">{title}</Text>
      {body ? (
        <Text variant="small" style={{ textAlign: 'center', maxWidth: 420 }}>
          {body}
        </Text>
      ) : null}
      {children}
    </View>
  );
}

/** Inline banner for form-level messages. */
export function Notice({ tone = 'info', children, testID }: { tone?: 'info' | 'ok' | 'error'; children: React.ReactNode; testID?: string }) {
  const bg = tone === 'ok' ? colors.okWash : tone === 'error' ? colors.dangerWash : colors.accentWash;
  const fg = tone === 'ok' ? colors.ok : tone === 'error' ? colors.danger : colors.ink;
  return (
    <View style={[styles.notice, { backgroundColor: bg }]} role={tone === 'error' ? 'alert' : 'status'} testID={testID}>
      {typeof children === 'string' ? <Text variant="small" style={{ color: fg }}>{children}</Text> : children}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { alignItems: 'center', justifyContent: 'center', gap: space.sm, padding: space.xl, minHeight: 140 },
  error: { borderWidth: 1, borderColor: colors.dangerWash, borderRadius: radius.md, backgroundColor: colors.sheet },
  notice: { borderRadius: radius.sm, paddingHorizontal: space.md, paddingVertical: space.sm },
});
