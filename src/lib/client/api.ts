/** The generic API client the islands share: JSON in and out, our error shape turned into ApiError. */

/** An API error with the status, code, message and details our routes return ({ error: { code, message, details } }). */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details: unknown = null,
  ) {
    super(message);
  }
}

/** Turns a non-2xx response into an ApiError carrying the server's message. */
export async function errorFrom(response: Response): Promise<ApiError> {
  try {
    const body = (await response.json()) as { error?: { code?: string; message?: string; details?: unknown } };
    return new ApiError(
      response.status,
      body.error?.code ?? 'http_error',
      body.error?.message ?? `The server answered ${response.status}.`,
      body.error?.details ?? null,
    );
  } catch {
    return new ApiError(response.status, 'http_error', `The server answered ${response.status}.`);
  }
}

/** Calls our API; a plain object body is sent as JSON; 204 resolves to undefined. */
export async function apiFetch<T>(path: string, init: Omit<RequestInit, 'body'> & { body?: unknown } = {}): Promise<T> {
  const { body, headers, ...rest } = init;
  const isJson = body !== undefined && !(body instanceof FormData);
  const response = await fetch(path, {
    credentials: 'same-origin',
    ...rest,
    headers: { accept: 'application/json', ...(isJson ? { 'content-type': 'application/json' } : {}), ...headers },
    ...(body === undefined ? {} : { body: isJson ? JSON.stringify(body) : (body as FormData) }),
  });
  if (!response.ok) throw await errorFrom(response);
  if (response.status === 204) return undefined as T;
  return (await response.json()) as T;
}
