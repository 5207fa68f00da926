import type { APIContext, APIRoute } from 'astro';
import { toErrorResponse } from './errors';

/** Wraps an API handler so every thrown error becomes our JSON error shape in one place. */
export function route(handler: (context: APIContext) => Promise<Response>): APIRoute {
  return async (context) => {
    try {
      return await handler(context);
    } catch (error) {
      return toErrorResponse(error);
    }
  };
}
