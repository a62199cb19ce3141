import React from 'react';
import { Slot, useGlobalSearchParams, usePathname } from 'expo-router';
import { PlansList } from '@/client/planning/PlansList';
import { ListDetailPanes } from '@/client/ui/ListDetailPanes';
import { useIsWide } from '@/client/ui/useLayout';

/** Wide screens: the lab's plans on the left, the chosen plan on the right; the planner gets the full width. */
export default function PlansLayout() {
  const wide = useIsWide();
  const pathname = usePathname();
  const { id } = useGlobalSearchParams<{ id?: string }>();
  if (!wide || pathname === '/plans/new') return <Slot />;
  return (
    <ListDetailPanes title="Plans" testIDPrefix="plans" list={<PlansList selectedId={id ? Number(id) : undefined} />}>
      <Slot />
    </ListDetailPanes>
  );
}
