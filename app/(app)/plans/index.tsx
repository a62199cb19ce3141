import React from 'react';
import { PlansHome } from '@/client/planning/PlansHome';
import { Screen } from '@/client/ui/Screen';
import { useIsWide } from '@/client/ui/useLayout';

export default function PlansIndex() {
  const wide = useIsWide();
  return (
    <Screen title={wide ? undefined : 'Plans'} subtitle="Drive plans for a target photon-pair rate" testID="plans-screen">
      <PlansHome wide={wide} />
    </Screen>
  );
}
