import nodemailer from 'nodemailer';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { config } from '../../server/config';
import { createClubFixture, testApp } from '../support/app';
import { useTestMailbox, type TestMailbox } from '../support/mail';

let mail: TestMailbox;

beforeAll(async () => {
  mail = await useTestMailbox();
});

afterAll(async () => {
  await mail.close();
});

describe('SMTP sink', () => {
  it('keeps what it receives over SMTP with headers and both parts decoded, newest first', async () => {
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port: mail.sink.smtpPort, secure: false });
    await transport.sendMail({ from: 'coach@fennickvale.example', to: 'saskia@fennickvale.example', subject: 'Früh training — 06:30', text: 'First line\nSee https://arcwright.example/x?y=1 ✓', html: '<p>Grüße <b>team</b></p>' });
    await transport.sendMail({ from: 'coach@fennickvale.example', to: 'orrin@fennickvale.example', subject: 'Second', text: 'two' });
    const [newest, older] = mail.sink.store.list();
    expect(newest).toMatchObject({ to: 'orrin@fennickvale.example', subject: 'Second', text: 'two', html: '' });
    expect(older).toMatchObject({ to: 'saskia@fennickvale.example', from: 'coach@fennickvale.example', subject: 'Früh training — 06:30', html: '<p>Grüße <b>team</b></p>' });
    expect(older.text).toBe('First line\nSee https://arcwright.example/x?y=1 ✓');
    expect(newest.id).toBeGreaterThan(older.id);
    transport.close();
  });
});

describe('development mailbox', () => {
  it('lists the received e-mails as JSON, newest first, when the fakes are on', async () => {
    const f = await createClubFixture(testApp());
    await f.admin.post(`/api/v1/clubs/${f.clubId}/invitations`, { email: 'bram.tolliver@fennickvale.example', role: 'coach' });
    const res = await request(f.app).get('/dev/mailbox.json');
    expect(res.status).toBe(200);
    expect(res.body.length).toBeGreaterThan(0);
    expect(Object.keys(res.body[0]).sort()).toEqual(['date', 'from', 'html', 'id', 'subject', 'text', 'to']);
    expect(res.body[0]).toMatchObject({ to: 'bram.tolliver@fennickvale.example', subject: 'Fixture Admin invites you to Fixture Club on Arcwright' });
    const ids = res.body.map((m: { id: number }) => m.id);
    expect(ids).toEqual([...ids].sort((a, b) => b - a));
  });

  it('shows the e-mails on a page with clickable links and no script or remote asset', async () => {
    const app = testApp();
    const res = await request(app).get('/dev/mailbox');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('text/html');
    expect(res.text).toContain('Development mailbox');
    expect(res.text).toContain('Fixture Admin invites you to Fixture Club on Arcwright');
    expect(res.text).toMatch(/<a href="http:\/\/[^"]+\/join\/[A-Za-z0-9_-]{43}">/);
    expect(res.text).not.toMatch(/<script|src="https?:|href="https?:\/\/(?!127\.0\.0\.1|localhost)[^"]*\.(css|js)"/i);
    expect(res.headers['content-security-policy']).toContain("script-src 'self'");
  });

  it('answers 503 with what to start when the sink is not running', async () => {
    const port = config.fakes.mailboxPort;
    config.fakes.mailboxPort = 1;
    try {
      const res = await request(testApp()).get('/dev/mailbox.json');
      expect(res.status).toBe(503);
      expect(res.body.error.message).toBe('The local mail sink is not answering on port 1. Start the fakes with `npm run fakes` (npm start and npm run dev do it), or set MAILBOX_FAKE_PORT to the port it uses.');
    } finally {
      config.fakes.mailboxPort = port;
    }
  });

  it('answers 404 for both the page and the JSON when the fakes are off', async () => {
    config.fakes.enabled = false;
    try {
      const app = testApp();
      for (const path of ['/dev/mailbox', '/dev/mailbox.json']) {
        const res = await request(app).get(path);
        expect(res.status).toBe(404);
        expect(res.text).not.toContain('Development mailbox');
      }
    } finally {
      config.fakes.enabled = true;
    }
  });
});
