import type { z } from 'zod';
import { badRequest } from './errors';

/** A JSON response with our content type. */
export function json(data: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(data), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', ...headers },
  });
}

/** Parses the URL's query string with a zod schema (throws ZodError → 400). */
export function parseQuery<T extends z.ZodType>(url: URL, schema: T): z.infer<T> {
  return schema.parse(Object.fromEntries(url.searchParams.entries()));
}

/** Parses a JSON request body with a zod schema; a body that is not JSON is a 400, one over the size limit a 413. */
export async function parseJson<T extends z.ZodType>(request: Request, schema: T): Promise<z.infer<T>> {
  const text = await request.text();
  let body: unknown;
  try {
    body = text === '' ? undefined : JSON.parse(text);
  } catch {
    throw badRequest('The request body is not valid JSON. Send a JSON object with Content-Type: application/json.');
  }
  return schema.parse(body);
}
