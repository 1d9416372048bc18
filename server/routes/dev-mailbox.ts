/**
 * The development mailbox, mounted at `/dev` only when the fakes are on: what the local SMTP sink
 * received, newest first, as a page (`GET /dev/mailbox`) and as JSON (`GET /dev/mailbox.json`).
 * The page is plain HTML with one inline stylesheet and no script, so it works under the app's CSP;
 * each HTML e-mail is shown in a sandboxed frame whose links open in the whole window.
 */
import { Router, type RequestHandler, type Response } from 'express';
import type { SinkMessage } from '../../shared/types/mailbox';
import { config } from '../config';
import { escapeHtml } from '../http/html';
import { publicRoute } from '../middleware/authorize';

async function fetchMessages(): Promise<SinkMessage[]> {
  const res = await fetch(`http://127.0.0.1:${config.fakes.mailboxPort}/messages`, { signal: AbortSignal.timeout(5000) });
  if (!res.ok) throw new Error(`the mail sink answered ${res.status}`);
  return (await res.json()) as SinkMessage[];
}

function sinkDown(res: Response, asJson: boolean): void {
  const message = `The local mail sink is not answering on port ${config.fakes.mailboxPort}. Start the fakes with \`npm run fakes\` (npm start and npm run dev do it), or set MAILBOX_FAKE_PORT to the port it uses.`;
  res.status(503);
  if (asJson) res.json({ error: { code: 'SERVICE_UNAVAILABLE', message } });
  else res.type('text/plain').send(message);
}

/** Escaped text with its web addresses turned into links. */
function linkify(text: string): string {
  return text
    .split(/(https?:\/\/[^\s<>"']+)/g)
    .map((piece, i) => (i % 2 === 1 ? `<a href="${escapeHtml(piece)}">${escapeHtml(piece)}</a>` : escapeHtml(piece)))
    .join('');
}

function frameSource(html: string): string {
  // Links inside the frame replace the whole mailbox page, as a mail client opens them in a browser.
  const base = '<base target="_top">';
  return /<head[^>]*>/i.test(html) ? html.replace(/<head[^>]*>/i, (head) => `${head}${base}`) : `${base}${html}`;
}

function renderPage(messages: SinkMessage[]): string {
  const items = messages
    .map(
      (m) => `<article class="mail" id="mail-${m.id}" data-testid="mail">
<header><h2>${escapeHtml(m.subject || '(no subject)')}</h2>
<dl><dt>To</dt><dd>${escapeHtml(m.to)}</dd><dt>From</dt><dd>${escapeHtml(m.from)}</dd><dt>Received</dt><dd><time datetime="${escapeHtml(m.date)}">${escapeHtml(m.date.replace('T', ' ').replace(/\.\d+Z$/, ' UTC'))}</time></dd></dl></header>
${m.html ? `<iframe title="HTML version of ${escapeHtml(m.subject)}" sandbox="allow-top-navigation-by-user-activation allow-popups" srcdoc="${escapeHtml(frameSource(m.html))}"></iframe>` : ''}
<details${m.html ? '' : ' open'}><summary>Plain-text version</summary><pre>${linkify(m.text)}</pre></details>
</article>`,
    )
    .join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>Development mailbox · Arcwright</title>
<style>
body{margin:0;padding:1.5rem;background:#F7F5F0;color:#1F2933;font-family:'Source Sans 3',system-ui,sans-serif}
main{max-width:60rem;margin:0 auto}
h1{font-size:1.5rem;margin:0 0 .25rem}
.lead{color:#64748B;margin:0 0 1.5rem}
.mail{background:#fff;border:1px solid #E4E1D8;border-radius:8px;padding:1rem 1.25rem;margin-bottom:1rem}
.mail h2{font-size:1.1rem;margin:0 0 .5rem}
dl{display:grid;grid-template-columns:max-content 1fr;gap:.15rem .75rem;margin:0 0 .75rem;font-size:.9rem}
dt{color:#64748B}dd{margin:0}
iframe{width:100%;height:28rem;border:1px solid #E4E1D8;border-radius:6px;background:#F7F5F0}
pre{white-space:pre-wrap;font:inherit;font-size:.95rem;margin:.5rem 0 0}
summary{cursor:pointer;color:#0F766E;margin-top:.5rem}
a{color:#0F766E}
.empty{color:#64748B}
</style></head>
<body><main>
<h1>Development mailbox</h1>
<p class="lead">E-mails the app sent to the local SMTP sink (port ${config.fakes.smtpPort}), newest first. Nothing here was delivered to anyone. Reload to see new ones.</p>
${items || '<p class="empty" data-testid="mailbox-empty">No e-mail yet. Invite someone or ask for a password reset, then reload.</p>'}
</main></body></html>`;
}

export const devMailboxRouter = Router();

/** Answers with the sink's messages, or 503 saying what to start when the sink does not answer. */
function withMessages(asJson: boolean, respond: (res: Response, messages: SinkMessage[]) => void): RequestHandler {
  return async (_req, res) => {
    let messages: SinkMessage[];
    try {
      messages = await fetchMessages();
    } catch {
      sinkDown(res, asJson);
      return;
    }
    res.setHeader('Cache-Control', 'no-store');
    respond(res, messages);
  };
}

devMailboxRouter.get('/mailbox.json', publicRoute, withMessages(true, (res, messages) => res.json(messages)));
devMailboxRouter.get('/mailbox', publicRoute, withMessages(false, (res, messages) => res.type('html').send(renderPage(messages))));
