// Reads back the messages nodemailer writes (UTF-8, quoted-printable or base64 parts, multipart
// alternatives) so the outbox can show subject, text and HTML. Not a general-purpose MIME parser.

export interface ParsedMessage {
  headers: Map<string, string>;
  text: string | null;
  html: string | null;
}

function splitHeadersAndBody(raw: string): [string, string] {
  const m = /\r?\n\r?\n/.exec(raw);
  return m ? [raw.slice(0, m.index), raw.slice(m.index + m[0].length)] : [raw, ''];
}

function parseHeaders(block: string): Map<string, string> {
  const headers = new Map<string, string>();
  for (const line of block.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const i = line.indexOf(':');
    if (i > 0) headers.set(line.slice(0, i).trim().toLowerCase(), line.slice(i + 1).trim());
  }
  return headers;
}

function decodeQuotedPrintable(s: string): Buffer {
  const bytes: number[] = [];
  const text = s.replace(/=\r?\n/g, '');
  for (let i = 0; i < text.length; i++) {
    if (text[i] === '=' && /^[0-9A-Fa-f]{2}$/.test(text.slice(i + 1, i + 3))) {
      bytes.push(parseInt(text.slice(i + 1, i + 3), 16));
      i += 2;
    } else {
      bytes.push(...Buffer.from(text[i]!, 'utf8'));
    }
  }
  return Buffer.from(bytes);
}

/** RFC 2047 encoded words, as nodemailer writes non-ASCII subjects. */
export function decodeEncodedWords(value: string): string {
  return value
    .replace(/\?=\s+=\?/g, '?==?')
    .replace(/=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g, (_all, _charset: string, enc: string, data: string) =>
      enc.toUpperCase() === 'B' ? Buffer.from(data, 'base64').toString('utf8') : decodeQuotedPrintable(data.replace(/_/g, ' ')).toString('utf8'),
    );
}

function param(header: string | undefined, name: string): string | undefined {
  const m = new RegExp(`${name}="?([^";]+)"?`, 'i').exec(header ?? '');
  return m?.[1];
}

function decodeBody(body: string, encoding: string | undefined): string {
  switch ((encoding ?? '7bit').toLowerCase()) {
    case 'base64':
      return Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8');
    case 'quoted-printable':
      return decodeQuotedPrintable(body).toString('utf8');
    default:
      return body;
  }
}

function walk(raw: string, out: ParsedMessage, top: boolean) {
  const [head, body] = splitHeadersAndBody(raw);
  const headers = parseHeaders(head);
  if (top) out.headers = headers;
  const type = (headers.get('content-type') ?? 'text/plain').toLowerCase();
  if (type.startsWith('multipart/')) {
    const boundary = param(headers.get('content-type'), 'boundary');
    if (!boundary) return;
    const parts = body.split(`--${boundary}`).slice(1);
    for (const part of parts) {
      if (part.startsWith('--')) break;
      walk(part.replace(/^\r?\n/, ''), out, false);
    }
    return;
  }
  const decoded = decodeBody(body, headers.get('content-transfer-encoding')).replace(/\r?\n$/, '');
  if (type.startsWith('text/html') && out.html === null) out.html = decoded;
  else if (type.startsWith('text/plain') && out.text === null) out.text = decoded;
}

export function parseMimeMessage(raw: string): ParsedMessage {
  const out: ParsedMessage = { headers: new Map(), text: null, html: null };
  walk(raw, out, true);
  return out;
}
