/**
 * The QueryClient of a page's islands. In the browser one client per feature is shared by the islands of the page
 * (separate React roots, one module), so a save in one island refreshes the others. On the server every render
 * gets a fresh client: a module-level cache there would outlive the request, so one person's data (e.g. initial
 * data seeded by `initialData`) could be rendered into the next person's page, and the browser, hydrating with its
 * own props, would find different text (React error #418).
 */
import { QueryClient, type QueryClientConfig } from '@tanstack/react-query';

const browserClients = new Map<string, QueryClient>();

/** The page's client for `feature`: shared in the browser, new for each server render. */
export function pageQueryClient(feature: string, config: QueryClientConfig): QueryClient {
  if (typeof window === 'undefined') return new QueryClient(config);
  let client = browserClients.get(feature);
  if (!client) {
    client = new QueryClient(config);
    browserClients.set(feature, client);
  }
  return client;
}
