import type { z } from 'zod';

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

/** Parses a JSON request body with a zod schema; a body that is not JSON is a 400 too. */
export async function parseJson<T extends z.ZodType>(request: Request, schema: T): Promise<z.infer<T>> {
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    body = undefined;
  }
  return schema.parse(body);
}
