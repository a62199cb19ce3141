import React from 'react';
import { useLocalSearchParams } from 'expo-router';
import { PlanSheet } from '@/client/planning/PlanSheet';
import { Screen } from '@/client/ui/Screen';
import { useIsWide } from '@/client/ui/useLayout';

export default function PlanScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const wide = useIsWide();
  return (
    <Screen testID="plan-screen" maxWidth={1100}>
      <PlanSheet id={Number(id)} showBack={!wide} />
    </Screen>
  );
}
