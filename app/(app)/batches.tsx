import React from 'react';
import { BatchesView } from '@/client/batches/BatchesView';
import { Screen } from '@/client/ui/Screen';

export default function BatchesScreen() {
  return (
    <Screen title="Batches" subtitle="Fabrication runs and the devices cut from them" testID="batches-screen">
      <BatchesView />
    </Screen>
  );
}
