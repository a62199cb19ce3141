import React from 'react';
import { Redirect } from 'expo-router';
import { useSession } from '../session/SessionProvider';

/** Lab-lead pages: anyone else is sent back to their own Account page (the API would answer 403). */
export function LeadOnly({ children }: { children: React.ReactNode }) {
  const { user } = useSession();
  if (user?.role !== 'lab_lead') return <Redirect href="/account" />;
  return <>{children}</>;
}
