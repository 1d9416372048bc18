/**
 * `npm run fakes`: starts every local stand-in for a hosted service, each on its own loopback port.
 * The OAuth 2.0 provider (Google stand-in), the payment provider and the SMTP sink with its mailbox listing;
 * each local stand-in is one `start...()` call here.
 */
import type { Server } from 'node:http';
import { config } from '../config';
import { log } from '../logger';
import { demoFakeSubscription } from '../seeders/demo/billing';
import { startOAuthFake } from './oauth';
import { startPaymentFake } from './payment';
import { startMailSink } from './smtp';

async function main(): Promise<void> {
  if (config.isProduction) throw new Error('The local stand-ins never run with NODE_ENV=production. Run them in development only.');
  const servers: Server[] = [];
  const closers: (() => Promise<void>)[] = [];

  servers.push(
    await startOAuthFake(
      {
        clientId: config.google.clientId,
        clientSecret: config.google.clientSecret,
        defaultEmail: config.fakes.oauthDefaultEmail,
        defaultName: config.fakes.oauthDefaultName,
      },
      config.fakes.oauthPort,
    ),
  );
  log.info(`OAuth fake (Google stand-in) on http://127.0.0.1:${config.fakes.oauthPort}`);

  const payment = await startPaymentFake(
    { secretKey: config.payment.secretKey, webhookSecret: config.payment.webhookSecret, webhookUrl: config.payment.webhookUrl },
    config.fakes.paymentPort,
  );
  servers.push(payment.server);
  // The demo club's subscription (server/seeders/0210-demo-billing.ts) lives at the provider too.
  payment.fake.seedSubscription(demoFakeSubscription());
  log.info(`Payment provider fake on http://127.0.0.1:${payment.port} (webhooks to ${config.payment.webhookUrl})`);

  const sink = await startMailSink({ smtpPort: config.fakes.smtpPort, httpPort: config.fakes.mailboxPort });
  closers.push(sink.close);
  log.info(`SMTP sink on 127.0.0.1:${sink.smtpPort}, its mailbox listing on http://127.0.0.1:${sink.httpPort}/messages`);

  const stop = () => {
    for (const server of servers) {
      server.close();
      server.closeAllConnections();
    }
    // An SMTP client that keeps its connection open must not hold the exit up for long.
    setTimeout(() => process.exit(0), 2000).unref();
    void Promise.allSettled(closers.map((close) => close())).then(() => process.exit(0));
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err: unknown) => {
  log.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
