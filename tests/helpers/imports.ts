/** Register imports through the running app's API, as the tests of the import drive them. */
import { api } from './session';

/** Uploads a file as the given session; resolves to the status and JSON body. */
export async function upload(cookie: string, name: string, bytes: Buffer, fields: Record<string, string> = {}) {
  const form = new FormData();
  form.set('file', new Blob([new Uint8Array(bytes)]), name);
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  const response = await api('/api/imports', { method: 'POST', cookie, body: form });
  return { status: response.status, body: (await response.json()) as any };
}

/** Commits (or cancels) a previewed import; resolves to the status and JSON body. */
export async function commit(cookie: string, id: string, body: unknown) {
  const response = await api(`/api/imports/${id}/commit`, { method: 'POST', cookie, body: JSON.stringify(body) });
  return { status: response.status, body: (await response.json()) as any };
}
