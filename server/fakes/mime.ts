/**
 * Just enough MIME (RFC 2045–2047) to read what the app sends to the local SMTP sink: header unfolding,
 * encoded words in headers, multipart bodies, and the base64 / quoted-printable transfer encodings.
 * The raw message is taken as latin1 text so every byte survives until a part is decoded with its charset.
 */

export interface ParsedMail {
  headers: Record<string, string>;
  text: string;
  html: string;
}

interface Entity {
  headers: Record<string, string>;
  body: string;
}

function splitEntity(raw: string): Entity {
  const match = /\r?\n\r?\n/.exec(raw);
  const headerText = match ? raw.slice(0, match.index) : raw;
  const body = match ? raw.slice(match.index + match[0].length) : '';
  const headers: Record<string, string> = {};
  for (const line of headerText.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!(name in headers)) headers[name] = line.slice(colon + 1).trim();
  }
  return { headers, body };
}

function parameter(value: string, name: string): string | null {
  const match = new RegExp(`;\\s*${name}\\s*=\\s*(?:"([^"]*)"|([^;\\s]+))`, 'i').exec(value);
  return match ? (match[1] ?? match[2]) : null;
}

function toEncoding(charset: string | null): BufferEncoding {
  const name = (charset ?? 'utf-8').toLowerCase();
  if (name === 'us-ascii' || name === 'ascii') return 'ascii';
  if (name === 'iso-8859-1' || name === 'latin1') return 'latin1';
  return 'utf8';
}

/** Quoted-printable to bytes (held in a latin1 string): soft breaks removed, `=XX` decoded. */
function decodeQuotedPrintable(text: string): string {
  return text.replace(/=\r?\n/g, '').replace(/=([0-9A-Fa-f]{2})/g, (_m, hex: string) => String.fromCharCode(parseInt(hex, 16)));
}

function decodeBody(entity: Entity): string {
  const encoding = (entity.headers['content-transfer-encoding'] ?? '7bit').toLowerCase();
  const charset = toEncoding(parameter(entity.headers['content-type'] ?? '', 'charset'));
  // The line break that ends the body belongs to the SMTP transfer, not to the text.
  let bytes = entity.body.replace(/\r?\n$/, '');
  if (encoding === 'base64') bytes = Buffer.from(bytes.replace(/\s+/g, ''), 'base64').toString('latin1');
  else if (encoding === 'quoted-printable') bytes = decodeQuotedPrintable(bytes);
  return Buffer.from(bytes, 'latin1').toString(charset).replace(/\r\n/g, '\n');
}

/** Decodes RFC 2047 encoded words (`=?utf-8?Q?...?=`, `=?utf-8?B?...?=`) in a header value. */
export function decodeHeader(value: string): string {
  return value
    .replace(/(\?=)\s+(=\?)/g, '$1$2')
    .replace(/=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g, (_m, charset: string, kind: string, data: string) => {
      const bytes = kind.toUpperCase() === 'B' ? Buffer.from(data, 'base64').toString('latin1') : decodeQuotedPrintable(data.replace(/_/g, ' '));
      return Buffer.from(bytes, 'latin1').toString(toEncoding(charset));
    });
}

function collect(entity: Entity, found: { text: string; html: string }): void {
  const type = (entity.headers['content-type'] ?? 'text/plain').toLowerCase();
  if (type.startsWith('multipart/')) {
    const boundary = parameter(entity.headers['content-type'] ?? '', 'boundary');
    if (!boundary) return;
    const pieces = entity.body.split(new RegExp(`\\r?\\n?--${boundary.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}(?:--)?[ \\t]*\\r?\\n?`));
    for (const piece of pieces.slice(1)) {
      if (piece.trim() !== '') collect(splitEntity(piece), found);
    }
    return;
  }
  if (/attachment/i.test(entity.headers['content-disposition'] ?? '')) return;
  if (type.startsWith('text/plain') && !found.text) found.text = decodeBody(entity);
  else if (type.startsWith('text/html') && !found.html) found.html = decodeBody(entity);
}

/** Reads a whole RFC 5322 message given as latin1 text. */
export function parseMail(raw: string): ParsedMail {
  const root = splitEntity(raw);
  const found = { text: '', html: '' };
  collect(root, found);
  const headers: Record<string, string> = {};
  for (const [name, value] of Object.entries(root.headers)) headers[name] = decodeHeader(value);
  return { headers, text: found.text, html: found.html };
}
