import Stripe from 'stripe';
import { z } from 'zod';
import { AppError } from '../http/errors';

/**
 * How the app reaches the payment provider, declared once from the environment. Locally
 * scripts/payments-fake/launch.mjs points these at the fake on loopback; in production leave
 * STRIPE_API_HOST/PORT/PROTOCOL unset and set the live keys.
 */
const ProviderEnvSchema = z.object({
  STRIPE_SECRET_KEY: z.string().min(1).optional(),
  STRIPE_WEBHOOK_SECRET: z.string().min(1).optional(),
  STRIPE_API_HOST: z.string().min(1).optional(),
  STRIPE_API_PORT: z.coerce.number().int().positive().optional(),
  STRIPE_API_PROTOCOL: z.enum(['http', 'https']).optional(),
});

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
  const env = ProviderEnvSchema.parse(process.env);
  if (!env.STRIPE_SECRET_KEY) throw notConfigured('STRIPE_SECRET_KEY');
  client = new Stripe(env.STRIPE_SECRET_KEY, {
    maxNetworkRetries: 2,
    timeout: 20_000,
    ...(env.STRIPE_API_HOST ? { host: env.STRIPE_API_HOST } : {}),
    ...(env.STRIPE_API_PORT ? { port: env.STRIPE_API_PORT } : {}),
    ...(env.STRIPE_API_PROTOCOL ? { protocol: env.STRIPE_API_PROTOCOL } : {}),
  });
  return client;
}

/** The secret the provider signs webhook events with. */
export function webhookSecret(): string {
  const secret = ProviderEnvSchema.parse(process.env).STRIPE_WEBHOOK_SECRET;
  if (!secret) throw notConfigured('STRIPE_WEBHOOK_SECRET');
  return secret;
}

/** True when the provider is configured (the seed skips the demo subscription otherwise). */
export function providerConfigured(): boolean {
  return Boolean(ProviderEnvSchema.parse(process.env).STRIPE_SECRET_KEY);
}
