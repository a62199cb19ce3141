import React from 'react';
import { StyleSheet, View } from 'react-native';
import type { CalibrationStatus, Role } from '../api/types';
import { ROLE_LABELS } from '../api/types';
import { colors, fonts, radius, space } from '../theme';
import { Text } from './Text';

type Tone = 'neutral' | 'accent' | 'ok' | 'pending' | 'danger';

const TONES: Record<Tone, { bg: string; fg: string }> = {
  neutral: { bg: '#ECE8DE', fg: colors.inkSoft },
  accent: { bg: colors.accentWash, fg: colors.accent },
  ok: { bg: colors.okWash, fg: colors.ok },
  pending: { bg: colors.pendingWash, fg: colors.pending },
  danger: { bg: colors.dangerWash, fg: colors.danger },
};

export function Badge({ label, tone = 'neutral', testID }: { label: string; tone?: Tone; testID?: string }) {
  const t = TONES[tone];
  return (
    <View style={[styles.badge, { backgroundColor: t.bg }]} testID={testID}>
      <Text style={[styles.text, { color: t.fg }]}>{label}</Text>
    </View>
  );
}

const CAL: Record<CalibrationStatus, { label: string; tone: Tone }> = {
  none: { label: 'Not calibrated', tone: 'neutral' },
  proposed: { label: 'Calibration proposed', tone: 'pending' },
  accepted: { label: 'Calibrated', tone: 'ok' },
};

export function CalibrationBadge({ status }: { status: CalibrationStatus }) {
  const c = CAL[status] ?? CAL.none;
  return <Badge label={c.label} tone={c.tone} testID={`calibration-${status}`} />;
}

export function RoleBadge({ role, testID }: { role: Role; testID?: string }) {
  return <Badge label={ROLE_LABELS[role] ?? role} tone={role === 'lab_lead' ? 'accent' : 'neutral'} testID={testID} />;
}

const styles = StyleSheet.create({
  badge: { alignSelf: 'flex-start', borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 2 },
  text: { fontFamily: fonts.sansMedium, fontSize: 12, lineHeight: 16 },
});
