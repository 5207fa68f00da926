/**
 * The caller's address, for rate limits. The request guard (http/request-guard.ts) has already replaced
 * X-Forwarded-For, which Astro's `clientAddress` reads, with the socket's peer — or, only when
 * AUTH_TRUST_PROXY=true, with the address the proxy appended — so a client cannot choose it.
 */
export function clientIpOf(_request: Request, clientAddress: string | undefined): string {
  return clientAddress ?? 'unknown';
}
