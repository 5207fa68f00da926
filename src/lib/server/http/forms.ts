/**
 * The app's pages write through the API routes, so every write is authorised, validated and audited in one place and
 * the authorisation matrix covers it. A page's HTML form posts (urlencoded) to the route; the route parses the form's
 * fields with the same schema as JSON and answers with a redirect back to the page and a message shown once
 * (flash.ts), for success and refusal alike. JSON clients are answered as always.
 */
import type { APIContext, APIRoute } from 'astro';
import type { z } from 'zod';
import { safeNext } from './safe-next';
import { badRequest, describeError, methodNotAllowed, toErrorResponse } from './errors';
import { flashCookie } from './flash';
import { parseJson } from './respond';

/** A form's fields; a name sent more than once (a group of checkboxes) becomes a list. */
export type FormFields = Record<string, string | string[]>;

const FORM_TYPE = 'application/x-www-form-urlencoded';
const readFields = new WeakMap<Request, FormFields>();

/** True for a page's HTML form post (urlencoded), which is answered with a redirect rather than JSON. */
export function isFormPost(request: Request): boolean {
  return (request.headers.get('content-type') ?? '').toLowerCase().startsWith(FORM_TYPE);
}

/** The posted form's fields (read once; later calls answer the same). */
export async function formFields(request: Request): Promise<FormFields> {
  const known = readFields.get(request);
  if (known) return known;
  const fields: FormFields = {};
  for (const [name, value] of (await request.formData()).entries()) {
    if (typeof value !== 'string') continue;
    const seen = fields[name];
    fields[name] = seen === undefined ? value : [...(Array.isArray(seen) ? seen : [seen]), value];
  }
  readFields.set(request, fields);
  return fields;
}

/** One field of a form as text ('' when absent; the first when sent more than once). */
export const field = (fields: FormFields, name: string): string => {
  const value = fields[name];
  return Array.isArray(value) ? (value[0] ?? '') : (value ?? '');
};

/** A field sent any number of times as a list (checkbox groups). */
export const fieldList = (fields: FormFields, name: string): string[] => {
  const value = fields[name];
  return value === undefined ? [] : Array.isArray(value) ? value : [value];
};

/**
 * The request body as `schema` wants it: JSON, or a form's fields turned into the same shape by `fromForm` (a form
 * sends only text, so blanks, lists and yes/no become what the schema expects there).
 */
export async function parseBody<T extends z.ZodType>(
  request: Request,
  schema: T,
  fromForm: (fields: FormFields) => unknown = (fields) => fields,
): Promise<z.infer<T>> {
  if (isFormPost(request)) return schema.parse(fromForm(await formFields(request)));
  return parseJson(request, schema);
}

/**
 * The page a form returns to: its `back` field when that is a path of this site, else the referring page of this
 * site, else /app. Reads the form's fields when the route did not need them (a button with only `back`).
 */
async function backTo(request: Request): Promise<string> {
  let back = '';
  if (isFormPost(request)) back = field(await formFields(request).catch((): FormFields => ({})), 'back');
  if (back) return safeNext(back);
  const referrer = request.headers.get('referer');
  const origin = new URL(request.url).origin;
  if (referrer?.startsWith(`${origin}/`)) return safeNext(referrer.slice(origin.length));
  return '/app';
}

/** A 303 to `location`, with a message for the page there and any cookies `extra` carries (a session). */
export function redirectWithFlash(
  location: string,
  flash: { kind: 'ok' | 'error'; message: string },
  extra?: Headers,
): Response {
  const headers = new Headers({ location });
  headers.append('set-cookie', flashCookie(flash));
  for (const cookie of extra?.getSetCookie() ?? []) headers.append('set-cookie', cookie);
  return new Response(null, { status: 303, headers });
}

/** The answer to a form that did its job: back to its page, saying `message` once. */
export async function formDone(request: Request, message: string): Promise<Response> {
  return redirectWithFlash(await backTo(request), { kind: 'ok', message });
}

/** The answer to a form that was refused: back to its page with the reason a person can act on. */
export async function formRefused(request: Request, error: unknown): Promise<Response> {
  const described = describeError(error);
  const first = Array.isArray(described.details) ? (described.details[0] as { message?: unknown } | undefined) : null;
  const message =
    described.code === 'invalid_request' && typeof first?.message === 'string' ? first.message : described.message;
  return redirectWithFlash(await backTo(request), { kind: 'error', message });
}

/**
 * HTML forms can only GET and POST: a page's form names the method it means (PATCH, PUT or DELETE) in its `_method`
 * field, and is handed to that method's handler. JSON clients use the method itself (405 here).
 */
export function formMethods(handlers: Partial<Record<'PATCH' | 'PUT' | 'DELETE', APIRoute>>): APIRoute {
  return async (context: APIContext) => {
    if (!isFormPost(context.request))
      return toErrorResponse(methodNotAllowed(`Use ${Object.keys(handlers).join(' or ')} for this address.`));
    try {
      const method = field(await formFields(context.request), '_method').toUpperCase();
      const handler = handlers[method as keyof typeof handlers];
      if (!handler) throw badRequest('This form does not say what it is for (_method).');
      return await handler(context);
    } catch (error) {
      return formRefused(context.request, error);
    }
  };
}
