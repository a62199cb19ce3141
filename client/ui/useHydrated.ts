import { useEffect, useState } from 'react';

/**
 * False during static rendering and the hydrating render, true afterwards. Screens that branch on
 * the query string (?token=) render their neutral state until then: the exported HTML was made
 * without a query, and a different first render would be a hydration mismatch.
 */
export function useHydrated(): boolean {
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  return hydrated;
}
