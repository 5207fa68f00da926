import type { APIContext, APIRoute } from 'astro';
import { toErrorResponse } from './errors';
import { formRefused, isFormPost } from './forms';

/**
 * Wraps an API handler so every thrown error becomes our JSON error shape in one place, or, for a page's form, a
 * redirect back to the page with the reason (forms.ts).
 */
export function route(handler: (context: APIContext) => Promise<Response>): APIRoute {
  return async (context) => {
    try {
      return await handler(context);
    } catch (error) {
      return isFormPost(context.request) ? formRefused(context.request, error) : toErrorResponse(error);
    }
  };
}
