// Key-value storage for the session: localStorage on web, an in-memory map where there is
// none (static rendering, private modes that throw, native without a storage module).
import { useCallback, useEffect, useState } from 'react';

export interface KeyValueStore {
  get(key: string): string | null;
  set(key: string, value: string): void;
  remove(key: string): void;
}

const memory = new Map<string, string>();

export const memoryStore: KeyValueStore = {
  get: (k) => memory.get(k) ?? null,
  set: (k, v) => void memory.set(k, v),
  remove: (k) => void memory.delete(k),
};

function webStore(): KeyValueStore | null {
  try {
    if (typeof window === 'undefined' || !window.localStorage) return null;
    const probe = '__fw_probe__';
    window.localStorage.setItem(probe, '1');
    window.localStorage.removeItem(probe);
    const ls = window.localStorage;
    return {
      get: (k) => ls.getItem(k),
      set: (k, v) => ls.setItem(k, v),
      remove: (k) => ls.removeItem(k),
    };
  } catch {
    return null;
  }
}

export function getStore(): KeyValueStore {
  return webStore() ?? memoryStore;
}

/**
 * A stored JSON value. `ready` is false until the first client-side read, so static HTML and the
 * first client render agree (nothing is read from storage during static rendering).
 */
export function useStoredValue<T>(key: string): {
  value: T | null;
  ready: boolean;
  save: (v: T | null) => void;
} {
  const [value, setValue] = useState<T | null>(null);
  const [ready, setReady] = useState(false);

  useEffect(() => {
    const raw = getStore().get(key);
    if (raw) {
      try {
        setValue(JSON.parse(raw) as T);
      } catch {
        getStore().remove(key);
      }
    }
    setReady(true);
  }, [key]);

  const save = useCallback(
    (v: T | null) => {
      setValue(v);
      if (v === null) getStore().remove(key);
      else getStore().set(key, JSON.stringify(v));
    },
    [key],
  );

  return { value, ready, save };
}
