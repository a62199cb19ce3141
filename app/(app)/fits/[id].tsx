import React from 'react';
import { useLocalSearchParams } from 'expo-router';
import { FitDetailView } from '@/client/calibration/FitDetailView';
import { Screen } from '@/client/ui/Screen';
import { useIsWide } from '@/client/ui/useLayout';

export default function FitScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const wide = useIsWide();
  return (
    <Screen testID="fit-screen" maxWidth={980}>
      <FitDetailView id={Number(id)} wide={wide} />
    </Screen>
  );
}
