/**
 * A local SMTP sink standing in for a mail provider in development and tests. It accepts every message
 * over real SMTP (smtp-server, no authentication, no TLS, loopback only), keeps the newest ones in memory
 * and lists them over HTTP:
 *
 * - `GET /health` → `{ status: 'ok' }`
 * - `GET /messages` → `[{ id, to, from, subject, text, html, date }]`, newest first.
 *
 * Nothing is relayed anywhere. The app shows the list at `/dev/mailbox` (server/routes/dev-mailbox.ts).
 */
import { createServer } from 'node:http';
import type { AddressInfo, Server as NetServer } from 'node:net';
import express, { type Express } from 'express';
import { SMTPServer } from 'smtp-server';
import type { SinkMessage } from '../../shared/types/mailbox';
import { log } from '../logger';
import { parseMail } from './mime';

/** Messages kept; older ones are dropped first. */
export const SINK_CAPACITY = 200;
/** Largest message accepted (the app's e-mails are a few kilobytes). */
const MAX_MESSAGE_BYTES = 5 * 1024 * 1024;

export class MailStore {
  private messages: SinkMessage[] = [];
  private nextId = 1;

  constructor(private readonly capacity = SINK_CAPACITY) {}

  add(message: Omit<SinkMessage, 'id'>): SinkMessage {
    const stored = { id: this.nextId++, ...message };
    this.messages.unshift(stored);
    if (this.messages.length > this.capacity) this.messages.length = this.capacity;
    return stored;
  }

  /** Newest first. */
  list(): SinkMessage[] {
    return [...this.messages];
  }
}

function createSmtp(store: MailStore): SMTPServer {
  return new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: 'Arcwright local mail sink: messages are kept for the development mailbox, never delivered',
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        if (stream.sizeExceeded) {
          callback(Object.assign(new Error('Message too large for the local mail sink'), { responseCode: 552 }));
          return;
        }
        const parsed = parseMail(Buffer.concat(chunks).toString('latin1'));
        const recipients = session.envelope.rcptTo.map((r) => r.address);
        const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
        store.add({
          to: parsed.headers.to ?? recipients.join(', '),
          from: parsed.headers.from ?? from,
          subject: parsed.headers.subject ?? '',
          text: parsed.text,
          html: parsed.html,
          date: new Date().toISOString(),
        });
        callback();
      });
    },
  });
}

function createMailboxApi(store: MailStore): Express {
  const app = express();
  app.disable('x-powered-by');
  app.get('/health', (_req, res) => {
    res.json({ status: 'ok' });
  });
  app.get('/messages', (_req, res) => {
    res.json(store.list());
  });
  return app;
}

export interface MailSink {
  store: MailStore;
  smtpPort: number;
  httpPort: number;
  close(): Promise<void>;
}

function listen(server: NetServer, port: number, host: string, variable: string): Promise<void> {
  return new Promise((resolve, reject) => {
    server.once('listening', () => resolve());
    server.once('error', (err: NodeJS.ErrnoException) =>
      reject(err.code === 'EADDRINUSE' ? new Error(`Port ${port} is in use: stop the other process or set ${variable}.`) : err),
    );
    server.listen(port, host);
  });
}

/** Starts the sink's SMTP and HTTP listeners (port 0 picks a free one); resolves once both listen. */
export async function startMailSink(ports: { smtpPort: number; httpPort: number }, host = '127.0.0.1'): Promise<MailSink> {
  const store = new MailStore();
  const smtp = createSmtp(store);
  // smtp-server re-emits socket and listen errors on itself; without a listener they would end the process.
  smtp.on('error', (err: Error) => log.warn('SMTP sink error', { reason: err.message }));
  await listen(smtp.server, ports.smtpPort, host, 'SMTP_FAKE_PORT');
  const http = createServer(createMailboxApi(store));
  try {
    await listen(http, ports.httpPort, host, 'MAILBOX_FAKE_PORT');
  } catch (err) {
    await new Promise<void>((resolve) => smtp.close(() => resolve()));
    throw err;
  }
  return {
    store,
    smtpPort: (smtp.server.address() as AddressInfo).port,
    httpPort: (http.address() as AddressInfo).port,
    close: async () => {
      http.closeAllConnections();
      await Promise.all([
        new Promise<void>((resolve) => http.close(() => resolve())),
        new Promise<void>((resolve) => smtp.close(() => resolve())),
      ]);
    },
  };
}
