import { config } from '../config';
import { requirePermission, requireWholeTrust } from '../auth/guard';
import { unauthenticated } from '../http/errors';
import type { BillingRequest } from './billing.service';

/** The trust whose invoices a member may read (trust admins and finance leads who see every school). */
export function requireInvoiceReader(locals: App.Locals): { id: string; name: string } {
  const trust = requireWholeTrust(requirePermission(locals, 'billing', 'invoices'), "read the trust's invoices");
  return { id: trust.id, name: trust.name };
}

/** A trust admin's billing request (403 for every other role, 401 when signed out). */
export function requireBillingManager(locals: App.Locals): BillingRequest {
  const trust = requireWholeTrust(requirePermission(locals, 'billing', 'manage'), 'manage the plan and billing');
  if (!locals.user) throw unauthenticated();
  return {
    trust: { id: trust.id, name: trust.name },
    actor: { actorUserId: locals.user.id, actorEmail: locals.user.email },
    origin: config().origin,
  };
}
