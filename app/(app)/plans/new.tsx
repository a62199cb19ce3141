import React from 'react';
import { useLocalSearchParams } from 'expo-router';
import Head from 'expo-router/head';
import { PlannerView } from '@/client/planning/PlannerView';
import { useHydrated } from '@/client/ui/useHydrated';
import { LoadingState } from '@/client/ui/States';

export default function NewPlanScreen() {
  const { device } = useLocalSearchParams<{ device?: string }>();
  // The exported HTML was rendered without the query string: branch on it only after hydration.
  const hydrated = useHydrated();
  return (
    <>
      <Head>
        <title>Plan a drive · Fluxwright</title>
      </Head>
      {hydrated ? <PlannerView deviceId={Number(device)} /> : <LoadingState label="Opening the planner…" />}
    </>
  );
}
