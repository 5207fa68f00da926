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

/**
 * Sends a body with XMLHttpRequest so the upload's progress can be shown (fetch cannot report it); resolves to
 * the JSON answer or rejects with the ApiError our error shape carries.
 */
export function uploadWithProgress<T>(
  url: string,
  body: XMLHttpRequestBodyInit,
  onProgress: (fraction: number) => void,
  headers: Record<string, string> = {},
): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.setRequestHeader('accept', 'application/json');
    for (const [name, value] of Object.entries(headers)) xhr.setRequestHeader(name, value);
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onload = async () => {
      const response = new Response(xhr.responseText, {
        status: xhr.status,
        headers: { 'content-type': 'application/json' },
      });
      if (xhr.status >= 200 && xhr.status < 300) resolve((await response.json()) as T);
      else reject(await errorFrom(response));
    };
    xhr.onerror = () =>
      reject(new ApiError(0, 'network', 'The upload did not reach the server. Check your connection and try again.'));
    xhr.send(body);
  });
}
