import Stripe from 'stripe';
import { config } from '../config';
import { AppError } from '../http/errors';

// How the app reaches the payment provider (see config.ts). Locally scripts/payments-fake/launch.mjs points
// it at the fake on loopback; in production STRIPE_API_HOST/PORT/PROTOCOL stay unset and the live keys are set.

const notConfigured = (variable: string) =>
  new AppError(
    503,
    'billing_not_configured',
    `Billing is not configured on this server (${variable} is not set). Ask whoever runs Airtally to set it.`,
  );

let client: Stripe | undefined;

/** The provider SDK client, configured only from the environment. */
export function paymentProvider(): Stripe {
  if (client) return client;
  const billing = config().billing;
  if (!billing.secretKey) throw notConfigured('STRIPE_SECRET_KEY');
  client = new Stripe(billing.secretKey, {
    maxNetworkRetries: 2,
    timeout: 20_000,
    ...(billing.apiHost ? { host: billing.apiHost } : {}),
    ...(billing.apiPort ? { port: billing.apiPort } : {}),
    ...(billing.apiProtocol ? { protocol: billing.apiProtocol } : {}),
  });
  return client;
}

/** The secret the provider signs webhook events with. */
export function webhookSecret(): string {
  const secret = config().billing.webhookSecret;
  if (!secret) throw notConfigured('STRIPE_WEBHOOK_SECRET');
  return secret;
}

/** True when the provider is configured (the seed skips the demo subscription otherwise). */
export function providerConfigured(): boolean {
  return Boolean(config().billing.secretKey);
}
