import React from 'react';
import { View } from 'react-native';
import { BatchesView } from '@/client/batches/BatchesView';
import { CompareView } from '@/client/batches/CompareView';
import { space } from '@/client/theme';
import { Screen } from '@/client/ui/Screen';

export default function BatchesScreen() {
  return (
    <Screen title="Batches" subtitle="Fabrication runs, the devices cut from them, and how their calibrations compare" testID="batches-screen" maxWidth={1100}>
      <View style={{ gap: space.xxl }}>
        <BatchesView />
        <CompareView />
      </View>
    </Screen>
  );
}
