/** Wraps an island in the page's shared QueryClient. */
import { QueryClientProvider } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { portfolioQueryClient } from '../../lib/client/portfolio';

export function QueryRoot({ children }: { children: ReactNode }) {
  return <QueryClientProvider client={portfolioQueryClient()}>{children}</QueryClientProvider>;
}
