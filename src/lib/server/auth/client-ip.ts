import { authConfig } from './auth-config';

/**
 * The caller's address: the socket's peer, or — only when AUTH_TRUST_PROXY=true — the last hop the
 * proxy appended to X-Forwarded-For (the left-hand entries can be forged by the client).
 */
export function clientIpOf(request: Request, socketAddress: string | undefined): string {
  if (authConfig().trustProxy) {
    const hops = (request.headers.get('x-forwarded-for') ?? '')
      .split(',')
      .map((h) => h.trim())
      .filter(Boolean);
    const last = hops[hops.length - 1];
    if (last) return last;
  }
  return socketAddress ?? 'unknown';
}
