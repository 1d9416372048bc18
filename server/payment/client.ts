/**
 * The payment provider's SDK client, built from `config.payment` (the local fake by default; production
 * swaps only host, port, protocol and keys). Built on first use and rebuilt when the settings change, so
 * tests can point it at a fake on a free port.
 */
import Stripe from 'stripe';
import { config } from '../config';

let cached: { key: string; client: Stripe } | null = null;

export function paymentClient(): Stripe {
  const { apiHost, apiPort, apiProtocol, secretKey } = config.payment;
  const key = `${apiProtocol}://${apiHost}:${apiPort}|${secretKey}`;
  if (cached?.key !== key) {
    cached = {
      key,
      client: new Stripe(secretKey, { host: apiHost, port: apiPort, protocol: apiProtocol, maxNetworkRetries: 0, telemetry: false, timeout: 20_000 }),
    };
  }
  return cached.client;
}

export { Stripe };
