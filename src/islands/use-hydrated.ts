/**
 * False on the server and in the first render, true once the island has hydrated. Buttons that act through
 * JavaScript are disabled until then, so a click before the island is ready is never silently lost.
 */
import { useEffect, useState } from 'react';

export function useHydrated(): boolean {
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  return hydrated;
}
