import Stripe from 'stripe';
import type { Config } from '../../config/env.ts';

/**
 * The hosted payment provider's official SDK. In development and tests it talks to the local fake
 * (backend/fakes/payments-fake.ts): STRIPE_API_HOST ("http://127.0.0.1:4242" or "127.0.0.1:4242"),
 * or else PAYMENTS_FAKE_PORT on loopback. With neither, it talks to the real provider. A production
 * config carries neither unless PAYMENTS_FAKE_IN_PRODUCTION says so (config/env.ts).
 */
export function providerEndpoint(config: Config): { host: string; port: number; protocol: 'http' | 'https' } | null {
  if (config.STRIPE_API_HOST) {
    const raw = config.STRIPE_API_HOST.includes('://')
      ? config.STRIPE_API_HOST
      : `${/^(127\.|localhost)/.test(config.STRIPE_API_HOST) ? 'http' : 'https'}://${config.STRIPE_API_HOST}`;
    const u = new URL(raw);
    const protocol = u.protocol === 'http:' ? 'http' : 'https';
    return { host: u.hostname, port: u.port ? Number(u.port) : protocol === 'http' ? 80 : 443, protocol };
  }
  if (config.PAYMENTS_FAKE_PORT) return { host: '127.0.0.1', port: config.PAYMENTS_FAKE_PORT, protocol: 'http' };
  return null;
}

const clients = new WeakMap<Config, Stripe>();

export function paymentProvider(config: Config): Stripe {
  let client = clients.get(config);
  if (!client) {
    const endpoint = providerEndpoint(config);
    client = new Stripe(config.STRIPE_SECRET_KEY, {
      ...(endpoint ?? {}),
      // The local fake answers at once; the real provider gets the SDK's own retries.
      maxNetworkRetries: endpoint ? 0 : 2,
      telemetry: false,
      timeout: 20_000,
    });
    clients.set(config, client);
  }
  return client;
}

/** Checks a webhook's signature against the raw body; throws when it does not match. */
export function verifyWebhook(config: Config, rawBody: Buffer, signature: string): Stripe.Event {
  return Stripe.webhooks.constructEvent(rawBody, signature, config.STRIPE_WEBHOOK_SECRET);
}

export type CheckoutSession = Stripe.Checkout.Session;
export type ProviderEvent = Stripe.Event;
