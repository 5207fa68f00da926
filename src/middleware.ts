import { defineMiddleware } from 'astro:middleware';

// Foundation stage: no sign-in yet, every request reads the demo trust. The sign-in feature
// replaces this with the session, active trust and role.
export const onRequest = defineMiddleware(async (context, next) => {
  context.locals.user = null;
  context.locals.trust = { id: 'demo-trust', name: 'Demo trust', role: 'viewer', schoolIds: null };
  return next();
});
