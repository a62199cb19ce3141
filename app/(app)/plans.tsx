import React from 'react';
import { PlanningReadiness } from '@/client/plans/PlanningReadiness';
import { Screen } from '@/client/ui/Screen';

export default function PlansScreen() {
  return (
    <Screen title="Plans" subtitle="Drive plans for a target photon-pair rate" testID="plans-screen">
      <PlanningReadiness />
    </Screen>
  );
}
