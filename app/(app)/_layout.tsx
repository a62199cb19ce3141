import React from 'react';
import { Redirect, Slot, usePathname } from 'expo-router';
import { useSession } from '@/client/session/SessionProvider';
import { AppShell } from '@/client/ui/Shell';
import { LoadingState } from '@/client/ui/States';

export default function SignedInLayout() {
  const { status } = useSession();
  const pathname = usePathname();
  // Until the stored session is read on the client (and during static rendering) show a calm placeholder.
  if (status === 'loading') return <LoadingState label="Opening Fluxwright…" />;
  if (status === 'signedOut') {
    const next = pathname && pathname !== '/' ? `?next=${encodeURIComponent(pathname)}` : '';
    return <Redirect href={`/sign-in${next}` as '/sign-in'} />;
  }
  return (
    <AppShell>
      <Slot />
    </AppShell>
  );
}
