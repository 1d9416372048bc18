/**
 * Outgoing e-mail: nodemailer over SMTP (configuration `mail`, the local sink by default) and the
 * templates of the messages the app sends. Each message has a plain-text and an HTML part with the same
 * words; the HTML uses inline styles only: no remote images, fonts, tracking pixels or scripts.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { config } from '../config';
import { ApiError } from '../http/errors';
import { escapeHtml } from '../http/html';
import { log } from '../logger';

export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

let transport: { key: string; transporter: Transporter } | null = null;

/** One transporter per SMTP setting (tests point the setting at a sink of their own). */
function transporter(): Transporter {
  const { host, port, secure, user, password } = config.mail;
  const key = JSON.stringify([host, port, secure, user, password]);
  if (transport?.key !== key) {
    transport?.transporter.close();
    transport = {
      key,
      transporter: nodemailer.createTransport({
        host,
        port,
        secure,
        auth: user ? { user, pass: password } : undefined,
        connectionTimeout: 10_000,
        greetingTimeout: 10_000,
        socketTimeout: 20_000,
      }),
    };
  }
  return transport.transporter;
}

/**
 * Sends one message. A mail server that cannot be reached or refuses the message becomes a 503 whose
 * message says what to check; the cause goes to the log.
 */
export async function sendMail(to: string, content: MailContent): Promise<void> {
  try {
    await transporter().sendMail({ from: config.mail.from, to, subject: content.subject, text: content.text, html: content.html });
  } catch (err) {
    log.warn('sending e-mail failed', { reason: err instanceof Error ? err.message : String(err), smtp: `${config.mail.host}:${config.mail.port}` });
    throw new ApiError(
      'MAIL_UNAVAILABLE',
      `The e-mail could not be sent: the mail server at ${config.mail.host}:${config.mail.port} did not take it. Nothing was changed; try again in a minute, or ask whoever runs Arcwright to check SMTP_HOST and SMTP_PORT.`,
    );
  }
}

/** A link into the app, from the configured public address. */
export function appLink(path: string): string {
  return `${config.mail.appUrl}${path}`;
}

const DATE_FORMAT = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'long', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZone: 'UTC', timeZoneName: 'short' });

export function formatMailDate(date: Date): string {
  return DATE_FORMAT.format(date);
}

interface Layout {
  heading: string;
  paragraphs: string[];
  action: { label: string; url: string };
  footnote: string;
}

/** The shared frame of every e-mail: chalk page, white card, teal button, ink text. */
function render(subject: string, layout: Layout): MailContent {
  const text = [
    layout.heading,
    '',
    ...layout.paragraphs.flatMap((p) => [p, '']),
    `${layout.action.label}: ${layout.action.url}`,
    '',
    layout.footnote,
    '',
    '— Arcwright, flight measurement for coaching staff',
  ].join('\n');
  const paragraphs = layout.paragraphs
    .map((p) => `<p style="margin:0 0 16px;font-size:16px;line-height:1.5;color:#1F2933">${escapeHtml(p)}</p>`)
    .join('\n');
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${escapeHtml(subject)}</title></head>
<body style="margin:0;padding:24px;background:#F7F5F0;font-family:'Source Sans 3','Segoe UI',Arial,sans-serif;color:#1F2933">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="max-width:560px;margin:0 auto;background:#FFFFFF;border-radius:8px;border:1px solid #E4E1D8">
<tr><td style="padding:28px 32px">
<p style="margin:0 0 20px;font-size:14px;font-weight:600;letter-spacing:.04em;color:#0F766E">ARCWRIGHT</p>
<h1 style="margin:0 0 16px;font-size:22px;line-height:1.3;color:#1F2933">${escapeHtml(layout.heading)}</h1>
${paragraphs}
<p style="margin:24px 0"><a href="${escapeHtml(layout.action.url)}" style="display:inline-block;padding:12px 20px;background:#0F766E;color:#FFFFFF;text-decoration:none;border-radius:6px;font-weight:600">${escapeHtml(layout.action.label)}</a></p>
<p style="margin:0 0 16px;font-size:14px;line-height:1.5;color:#64748B">If the button does not work, copy this address into your browser:<br><a href="${escapeHtml(layout.action.url)}" style="color:#0F766E;word-break:break-all">${escapeHtml(layout.action.url)}</a></p>
<p style="margin:0;font-size:14px;line-height:1.5;color:#64748B">${escapeHtml(layout.footnote)}</p>
</td></tr></table>
</body></html>`;
  return { subject, text, html };
}

const ROLE_PHRASE = { admin: 'a club admin', coach: 'a coach', athlete: 'an athlete' } as const;

export interface InvitationMail {
  clubName: string;
  inviterName: string;
  role: keyof typeof ROLE_PHRASE;
  /** The athlete profile the invitee will sign in as, when the invitation is tied to one. */
  athleteName: string | null;
  link: string;
  expiresAt: Date;
}

export function invitationMail(m: InvitationMail): MailContent {
  const what =
    m.role === 'athlete'
      ? `As an athlete you will see your own flights, their reports and your progress${m.athleteName ? `, recorded under the profile "${m.athleteName}"` : ''}.`
      : m.role === 'coach'
        ? 'As a coach you will run sessions, upload and trace clips, and review the fitted flights of every athlete.'
        : 'As a club admin you will run the club: members, invitations and seats, as well as everything a coach does.';
  return render(`${m.inviterName} invites you to ${m.clubName} on Arcwright`, {
    heading: `Join ${m.clubName} on Arcwright`,
    paragraphs: [
      `${m.inviterName} has invited you to join ${m.clubName} as ${ROLE_PHRASE[m.role]}. Arcwright measures the flight of thrown and kicked balls from video: launch speed and angle, carry, apex and hang time.`,
      what,
    ],
    action: { label: 'Accept the invitation', url: m.link },
    footnote: `The link works once, until ${formatMailDate(m.expiresAt)}. If you did not expect this invitation you can ignore this e-mail; nothing happens unless the link is used.`,
  });
}

export interface PasswordResetMail {
  displayName: string;
  link: string;
  expiresAt: Date;
}

export function passwordResetMail(m: PasswordResetMail): MailContent {
  return render('Choose a new Arcwright password', {
    heading: 'Choose a new password',
    paragraphs: [
      `Hello ${m.displayName}, someone asked to reset the password of your Arcwright account. If it was you, choose a new password with the link below.`,
      'Once the new password is set, every other place where you are signed in is signed out.',
    ],
    action: { label: 'Choose a new password', url: m.link },
    footnote: `The link works once, until ${formatMailDate(m.expiresAt)}. If you did not ask for it, ignore this e-mail: your password stays as it is.`,
  });
}
