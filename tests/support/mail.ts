/**
 * A real SMTP sink for API tests: started in the test process on free ports, with the app's mail settings
 * (and the development mailbox) pointed at it. Tests wait for the message to a given address and read
 * the token of its link.
 */
import { config } from '../../server/config';
import { startMailSink, type MailSink } from '../../server/fakes/smtp';
import type { SinkMessage } from '../../shared/types/mailbox';

export interface TestMailbox {
  sink: MailSink;
  /** The newest message to `address` received after `since` (a message id), waiting up to 5 s. */
  waitFor(address: string, since?: number): Promise<SinkMessage>;
  /** The id of the newest message so far (0 when none), to wait for a later one. */
  lastId(): number;
  /** Messages received for `address`, newest first. */
  to(address: string): SinkMessage[];
  close(): Promise<void>;
}

export async function useTestMailbox(): Promise<TestMailbox> {
  const sink = await startMailSink({ smtpPort: 0, httpPort: 0 });
  const saved = { host: config.mail.host, port: config.mail.port, mailboxPort: config.fakes.mailboxPort, smtpPort: config.fakes.smtpPort };
  config.mail.host = '127.0.0.1';
  config.mail.port = sink.smtpPort;
  config.fakes.smtpPort = sink.smtpPort;
  config.fakes.mailboxPort = sink.httpPort;
  const to = (address: string) => sink.store.list().filter((m) => m.to.toLowerCase().includes(address.toLowerCase()));
  return {
    sink,
    to,
    lastId: () => sink.store.list()[0]?.id ?? 0,
    async waitFor(address, since = 0) {
      const deadline = Date.now() + 5000;
      for (;;) {
        const found = to(address).find((m) => m.id > since);
        if (found) return found;
        if (Date.now() > deadline) throw new Error(`No e-mail to ${address} arrived at the test sink within 5 s.`);
        await new Promise((r) => setTimeout(r, 25));
      }
    },
    async close() {
      await sink.close();
      config.mail.host = saved.host;
      config.mail.port = saved.port;
      config.fakes.mailboxPort = saved.mailboxPort;
      config.fakes.smtpPort = saved.smtpPort;
    },
  };
}

/** The token of the first link to `path` (`/join/` or `/reset-password/`) in the message's text. */
export function linkToken(message: SinkMessage, path: '/join/' | '/reset-password/'): string {
  const match = new RegExp(`${path}([A-Za-z0-9_-]{43})`).exec(message.text);
  if (!match) throw new Error(`No ${path} link in the e-mail "${message.subject}".`);
  return match[1];
}
