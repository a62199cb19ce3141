import React, { useEffect, useRef } from 'react';
import { Platform } from 'react-native';
import { Slot, usePathname, useRouter } from 'expo-router';
import { useSession } from '@/client/session/SessionProvider';
import { AppShell } from '@/client/ui/Shell';
import { LoadingState } from '@/client/ui/States';

export default function SignedInLayout() {
  const { status, signedOutOnPurpose } = useSession();
  const pathname = usePathname();
  const router = useRouter();
  const redirected = useRef(false);

  useEffect(() => {
    if (status !== 'signedOut') {
      redirected.current = false;
      return;
    }
    // Once only: without the Slot mounted the router's idea of the path drifts.
    if (redirected.current) return;
    redirected.current = true;
    if (signedOutOnPurpose) {
      router.replace('/sign-in');
      return;
    }
    // Come back here after signing in.
    const next = pathname && pathname !== '/' && pathname !== '/devices' ? `?next=${encodeURIComponent(pathname)}` : '';
    // On web a plain location change: router.replace from this Slot layout drops the query string.
    if (Platform.OS === 'web' && typeof window !== 'undefined') window.location.replace(`/sign-in${next}`);
    else router.replace(`/sign-in${next}` as '/sign-in');
  }, [status, pathname, router, signedOutOnPurpose]);

  // Until the stored session is read on the client (and during static rendering) show a calm placeholder.
  if (status !== 'signedIn') return <LoadingState label={status === 'loading' ? 'Opening Fluxwright…' : 'Signing you in first…'} />;
  return (
    <AppShell>
      <Slot />
    </AppShell>
  );
}
