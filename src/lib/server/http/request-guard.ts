import { subscribe } from 'node:diagnostics_channel';
import type { IncomingMessage, ServerResponse } from 'node:http';
import { AppError } from './errors';

/** The largest register upload (the file itself); the request may add a little multipart framing. */
export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;
/** The largest request body anywhere but the register upload: JSON, forms and provider webhooks. */
export const MAX_BODY_BYTES = 1024 * 1024;
const UPLOAD_FRAMING_BYTES = 256 * 1024;
/**
 * A body over its limit is still read (and thrown away) up to twice the limit or 8 MB, so the client gets
 * to read our 413 (browsers and fetch give up on a connection closed under an upload); beyond that the
 * connection is closed and the rest is never read.
 */
const discardAtMost = (limit: number) => Math.max(8 * 1024 * 1024, 2 * limit);

/** Header the guard sets (replacing anything the client sent) to the caller's address. */
export const CLIENT_IP_HEADER = 'x-airtally-client-ip';
/** Header the guard sets (replacing anything the client sent) when the declared body is over the limit. */
export const BODY_TOO_LARGE_HEADER = 'x-airtally-body-too-large';

/** The largest monitor-log upload: the file itself is the body, streamed and counted as it is read. */
export const MAX_LOG_UPLOAD_BYTES = 1024 * 1024 * 1024;

/** The upload routes (POST) with their body limits and what to do about a file over the limit. */
const UPLOAD_ROUTES: Record<string, { limitBytes: number; advice: string }> = {
  '/api/imports': {
    limitBytes: MAX_UPLOAD_BYTES + UPLOAD_FRAMING_BYTES,
    advice: `the limit is ${MAX_UPLOAD_BYTES / 1024 / 1024} MB. Split the register into smaller files (for example one per school), or remove pictures and other sheets, and import them one by one.`,
  },
  '/api/monitor-logs': {
    limitBytes: MAX_LOG_UPLOAD_BYTES,
    advice: `the limit is ${MAX_LOG_UPLOAD_BYTES / 1024 / 1024} MB. Split the log (for example by month) and import the parts one by one.`,
  },
};

/** The most bytes a request to this path may send. */
export function bodyLimitFor(method: string, pathname: string): number {
  const upload = method === 'POST' ? UPLOAD_ROUTES[pathname.replace(/\/+$/, '')] : undefined;
  return upload?.limitBytes ?? MAX_BODY_BYTES;
}

/** 413 with a message a person can act on. */
export const bodyTooLarge = (limitBytes: number) => {
  const upload = Object.values(UPLOAD_ROUTES).find((r) => r.limitBytes === limitBytes);
  return new AppError(
    413,
    'body_too_large',
    upload
      ? `This upload is too large: ${upload.advice}`
      : `This request is too large: the limit is ${Math.round(limitBytes / 1024)} KB, far more than this form or API needs.`,
    { limitBytes },
  );
};

/**
 * The caller's address: the socket's peer, or — only behind a trusted proxy that overwrites
 * X-Forwarded-For — the last address in that header (the one the proxy appended; anything left of
 * it was sent by the client and may be forged).
 */
export function clientAddressOf(req: IncomingMessage, trustProxy: boolean): string {
  if (trustProxy) {
    const raw = req.headers['x-forwarded-for'];
    const hops = (Array.isArray(raw) ? raw.join(',') : (raw ?? ''))
      .split(',')
      .map((h) => h.trim())
      .filter(Boolean);
    const last = hops[hops.length - 1];
    if (last) return last;
  }
  return req.socket.remoteAddress ?? 'unknown';
}

/**
 * The body's chunks, refusing with 413 once more than `limit` bytes have arrived: the rest is read and
 * thrown away up to discardAtMost(limit), past which the connection is closed instead.
 */
async function* limitedBody(req: IncomingMessage, res: ServerResponse, limit: number): AsyncGenerator<Buffer> {
  let received = 0;
  for await (const chunk of req as AsyncIterable<Buffer>) {
    received += chunk.length;
    if (received > discardAtMost(limit)) {
      if (!res.headersSent) res.setHeader('connection', 'close');
      throw bodyTooLarge(limit);
    }
    if (received <= limit) yield chunk;
  }
  if (received > limit) throw bodyTooLarge(limit);
}

const METHODS_WITH_BODY = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * Prepares each request before the app sees it: fixes the caller's address (Astro and better-auth read
 * X-Forwarded-For's first entry, so it is replaced by the address we trust), and limits the body — a
 * declared size over the limit is refused before anything is read, a body sent without a declared size
 * is counted as it streams.
 */
export function guardRequest(req: IncomingMessage, res: ServerResponse, trustProxy: boolean): void {
  const address = clientAddressOf(req, trustProxy);
  req.headers['x-forwarded-for'] = address;
  req.headers[CLIENT_IP_HEADER] = address;
  delete req.headers[BODY_TOO_LARGE_HEADER];
  const method = (req.method ?? 'GET').toUpperCase();
  if (!METHODS_WITH_BODY.has(method)) return;
  const limit = bodyLimitFor(method, (req.url ?? '/').split('?')[0] ?? '/');
  const declared = Number(req.headers['content-length'] ?? Number.NaN);
  if (declared > limit) {
    req.headers[BODY_TOO_LARGE_HEADER] = String(limit);
    if (declared > discardAtMost(limit)) res.setHeader('connection', 'close');
    return;
  }
  // Astro builds the request body from `req.body` when it is set (see NodeApp.createRequest).
  (req as IncomingMessage & { body?: AsyncIterable<Buffer> }).body = limitedBody(req, res, limit);
}

/**
 * True when answering without reading the body should close the connection: Node would otherwise read
 * and discard the whole body to keep the connection, and a body sent without a declared size (or with a
 * huge one) has no end we can count on.
 */
export function mustCloseUnreadBody(request: Request): boolean {
  if (!request.body || request.bodyUsed) return false;
  const declared = Number(request.headers.get('content-length') ?? Number.NaN);
  return !(declared <= discardAtMost(bodyLimitFor(request.method, new URL(request.url).pathname)));
}

let installed = false;

/**
 * Runs guardRequest for every request the Node server receives, before its request handler (Node's
 * `http.server.request.start` diagnostics channel is published just before the 'request' event).
 */
export function installRequestGuard(trustProxy: boolean): void {
  if (installed) return;
  installed = true;
  subscribe('http.server.request.start', (message) => {
    const { request, response } = message as { request: IncomingMessage; response: ServerResponse };
    guardRequest(request, response, trustProxy);
  });
}
