import { forbidden, unauthenticated } from '../http/errors';
import type { ActiveTrust } from './context';

/** The active trust of a signed-in member; 401 without a session, 403 without a trust. */
export function requireTrust(locals: App.Locals): ActiveTrust {
  if (!locals.trust) {
    if (!locals.user) throw unauthenticated();
    throw forbidden('use Airtally without a trust');
  }
  return locals.trust;
}
