import React, { createContext, useCallback, useContext, useEffect, useMemo, useRef } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { configureHttp, http } from '../api/http';
import type { Role, SignInResult, User } from '../api/types';
import { useStoredValue } from './storage';

const STORAGE_KEY = 'fluxwright.session.v1';

interface StoredSession {
  token: string;
  expiresAt: string;
  user: User;
}

export type SessionStatus = 'loading' | 'signedOut' | 'signedIn';

export interface SessionValue {
  status: SessionStatus;
  user: User | null;
  token: string | null;
  /** Store the result of sign-in or invitation acceptance. */
  signIn: (result: SignInResult) => void;
  signOut: () => Promise<void>;
  hasRole: (...roles: Role[]) => boolean;
  /** True after the person pressed Sign out (as opposed to an expired or rejected token). */
  signedOutOnPurpose: boolean;
}

const SessionContext = createContext<SessionValue | null>(null);

function expired(s: StoredSession): boolean {
  const t = Date.parse(s.expiresAt);
  return Number.isFinite(t) && t <= Date.now();
}

export function SessionProvider({ children }: { children: React.ReactNode }) {
  const queryClient = useQueryClient();
  const { value, ready, save } = useStoredValue<StoredSession>(STORAGE_KEY);
  const tokenRef = useRef<string | null>(null);
  const [signedOutOnPurpose, setSignedOutOnPurpose] = React.useState(false);

  const live = value && !expired(value) ? value : null;
  tokenRef.current = live?.token ?? null;

  const dropSession = useCallback(() => {
    save(null);
    tokenRef.current = null;
    queryClient.clear();
  }, [queryClient, save]);

  // Registered synchronously in render so the very first queries already carry the token.
  configureHttp({ getToken: () => tokenRef.current, onUnauthenticated: dropSession });

  useEffect(() => {
    if (ready && value && expired(value)) dropSession();
  }, [ready, value, dropSession]);

  // Refresh the stored user (role or name may have changed since sign-in).
  const liveToken = live?.token;
  useEffect(() => {
    if (!liveToken) return;
    let cancelled = false;
    http
      .get<{ user: User }>('/api/auth/me')
      .then((res) => {
        if (!cancelled && tokenRef.current === liveToken && value) save({ ...value, user: res.user });
      })
      .catch(() => {
        /* a 401 already dropped the session; other errors keep the stored user */
      });
    return () => {
      cancelled = true;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [liveToken]);

  const signIn = useCallback(
    (result: SignInResult) => {
      queryClient.clear();
      setSignedOutOnPurpose(false);
      tokenRef.current = result.token;
      save({ token: result.token, expiresAt: result.expiresAt, user: result.user });
    },
    [queryClient, save],
  );

  const signOut = useCallback(async () => {
    try {
      if (tokenRef.current) await http.post('/api/auth/sign-out');
    } catch {
      /* the client drops the token regardless */
    }
    setSignedOutOnPurpose(true);
    dropSession();
  }, [dropSession]);

  const user = live?.user ?? null;
  const status: SessionStatus = !ready ? 'loading' : live ? 'signedIn' : 'signedOut';

  const ctx = useMemo<SessionValue>(
    () => ({
      status,
      user,
      token: live?.token ?? null,
      signIn,
      signOut,
      hasRole: (...roles: Role[]) => !!user && roles.includes(user.role),
      signedOutOnPurpose,
    }),
    [status, user, live?.token, signIn, signOut, signedOutOnPurpose],
  );

  return <SessionContext.Provider value={ctx}>{children}</SessionContext.Provider>;
}

export function useSession(): SessionValue {
  const ctx = useContext(SessionContext);
  if (!ctx) throw new Error('useSession must be used inside <SessionProvider>');
  return ctx;
}

/** Roles allowed to register batches, devices and cooldowns (API: lab_lead, device_engineer). */
export function canEditInventory(role: Role | undefined): boolean {
  return role === 'lab_lead' || role === 'device_engineer';
}
