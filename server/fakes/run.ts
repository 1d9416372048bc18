/**
 * `npm run fakes`: starts every local stand-in for a hosted service, each on its own loopback port.
 * Now: the OAuth 2.0 provider (Google stand-in). Later issues add the payment provider fake and an SMTP sink
 * here, one `start...()` call each.
 */
import type { Server } from 'node:http';
import { config } from '../config';
import { log } from '../logger';
import { startOAuthFake } from './oauth';

async function main(): Promise<void> {
  const servers: Server[] = [];

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

  // Payment provider fake: started here when billing arrives.
  // SMTP sink: started here when e-mail arrives.

  const stop = () => {
    for (const server of servers) {
      server.close();
      server.closeAllConnections();
    }
    process.exit(0);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err: unknown) => {
  log.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
