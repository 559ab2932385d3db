// A small MIME reader for the local fake relay: enough of RFC 5322 / 2045 / 2046 / 2047 to read what our
// own sender (nodemailer) produces — headers with folding and encoded words, single-part or nested
// multipart bodies, quoted-printable and base64 transfer encodings. It is not a general mail parser
// (no attachments, no S/MIME); `mailparser` is not a dependency, and the dev mailbox needs no more.

export interface ParsedMail {
  messageId: string | null;
  from: string | null;
  to: string | null;
  subject: string;
  text: string | null;
  html: string | null;
}

interface Part {
  headers: Map<string, string>;
  body: string;
}

/** Parses a raw RFC 5322 message into its addresses, subject and text/HTML bodies. */
export function parseMime(raw: string): ParsedMail {
  const root = splitPart(raw);
  const found: { text: string | null; html: string | null } = { text: null, html: null };
  collectBodies(root, found, 0);
  return {
    messageId: headerOrNull(root, 'message-id'),
    from: headerOrNull(root, 'from'),
    to: headerOrNull(root, 'to'),
    subject: decodeEncodedWords(root.headers.get('subject') ?? ''),
    text: found.text,
    html: found.html,
  };
}

function headerOrNull(part: Part, name: string): string | null {
  const value = part.headers.get(name);
  return value === undefined ? null : decodeEncodedWords(value);
}

/** Splits one entity into its headers (unfolded, lower-cased names) and its body. */
function splitPart(raw: string): Part {
  const normalised = raw.replace(/\r\n/g, '\n');
  const cut = normalised.indexOf('\n\n');
  const head = cut === -1 ? normalised : normalised.slice(0, cut);
  const body = cut === -1 ? '' : normalised.slice(cut + 2);
  const headers = new Map<string, string>();
  // Folded header lines continue with whitespace (RFC 5322 §2.2.3).
  for (const line of head.replace(/\n[ \t]+/g, ' ').split('\n')) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!headers.has(name)) headers.set(name, line.slice(colon + 1).trim());
  }
  return { headers, body };
}

/** Reads `type/subtype; key=value; key="quoted"` into a lower-cased type and its parameters. */
export function parseContentType(value: string | undefined): { type: string; params: Map<string, string> } {
  const [typePart = '', ...rest] = (value ?? 'text/plain').split(';');
  const params = new Map<string, string>();
  for (const piece of rest) {
    const eq = piece.indexOf('=');
    if (eq === -1) continue;
    const key = piece.slice(0, eq).trim().toLowerCase();
    let val = piece.slice(eq + 1).trim();
    if (val.startsWith('"') && val.endsWith('"')) val = val.slice(1, -1).replace(/\\(.)/g, '$1');
    params.set(key, val);
  }
  return { type: typePart.trim().toLowerCase() || 'text/plain', params };
}

const MAX_DEPTH = 8;

function collectBodies(part: Part, found: { text: string | null; html: string | null }, depth: number): void {
  const { type, params } = parseContentType(part.headers.get('content-type'));
  const disposition = (part.headers.get('content-disposition') ?? '').toLowerCase();
  if (type.startsWith('multipart/')) {
    const boundary = params.get('boundary');
    if (!boundary || depth >= MAX_DEPTH) return;
    for (const child of splitMultipart(part.body, boundary)) collectBodies(splitPart(child), found, depth + 1);
    return;
  }
  if (disposition.startsWith('attachment')) return;
  if (type !== 'text/plain' && type !== 'text/html') return;
  const decoded = decodeBody(part.body, part.headers.get('content-transfer-encoding'), params.get('charset'));
  if (type === 'text/plain' && found.text === null) found.text = decoded;
  if (type === 'text/html' && found.html === null) found.html = decoded;
}

/** The parts between `--boundary` lines, up to the closing `--boundary--` (RFC 2046 §5.1.1). */
export function splitMultipart(body: string, boundary: string): string[] {
  const parts: string[] = [];
  const delimiter = `--${boundary}`;
  let current: string[] | null = null;
  for (const line of body.split('\n')) {
    const trimmed = line.trimEnd();
    if (trimmed === `${delimiter}--`) break;
    if (trimmed === delimiter) {
      if (current) parts.push(current.join('\n'));
      current = [];
      continue;
    }
    current?.push(line);
  }
  if (current) parts.push(current.join('\n'));
  return parts;
}

/** Undoes a Content-Transfer-Encoding and decodes the bytes in the part's charset. */
export function decodeBody(body: string, encoding: string | undefined, charset: string | undefined): string {
  const enc = (encoding ?? '7bit').trim().toLowerCase();
  let bytes: Uint8Array;
  if (enc === 'base64') bytes = Buffer.from(body.replace(/[^A-Za-z0-9+/=]/g, ''), 'base64');
  else if (enc === 'quoted-printable') bytes = decodeQuotedPrintable(body);
  else bytes = Buffer.from(body, 'utf8');
  const text = decodeCharset(bytes, charset);
  // A body's final line break belongs to the MIME framing, not to the text.
  return enc === 'base64' ? text : text.replace(/\n$/, '');
}

/** Quoted-printable (RFC 2045 §6.7): `=XX` is a byte, `=` at a line end is a soft break. */
export function decodeQuotedPrintable(input: string): Uint8Array {
  // Trailing whitespace on a line was added in transport and is dropped (RFC 2045 §6.7 rule 3).
  return decodeQpOctets(
    input
      .replace(/\r\n/g, '\n')
      .replace(/[ \t]+$/gm, '')
      .replace(/=\n/g, ''),
  );
}

function decodeQpOctets(unwrapped: string): Uint8Array {
  const out: number[] = [];
  for (let i = 0; i < unwrapped.length; i++) {
    const ch = unwrapped[i]!;
    const hex = unwrapped.slice(i + 1, i + 3);
    if (ch === '=' && /^[0-9A-Fa-f]{2}$/.test(hex)) {
      out.push(parseInt(hex, 16));
      i += 2;
    } else {
      for (const b of Buffer.from(ch, 'utf8')) out.push(b);
    }
  }
  return Uint8Array.from(out);
}

function decodeCharset(bytes: Uint8Array, charset: string | undefined): string {
  try {
    return new TextDecoder(charset ?? 'utf-8').decode(bytes);
  } catch {
    return new TextDecoder('utf-8').decode(bytes);
  }
}

/** Decodes RFC 2047 encoded words (`=?utf-8?Q?...?=`, `=?utf-8?B?...?=`) in a header value. */
export function decodeEncodedWords(value: string): string {
  // Whitespace between two adjacent encoded words is not part of the text (RFC 2047 §6.2).
  const joined = value.replace(/(=\?[^?]+\?[QqBb]\?[^?]*\?=)\s+(?==\?)/g, '$1');
  return joined.replace(/=\?([^?]+)\?([QqBb])\?([^?]*)\?=/g, (_m, charset: string, kind: string, data: string) => {
    const bytes = kind.toUpperCase() === 'B' ? Buffer.from(data, 'base64') : decodeQpOctets(data.replace(/_/g, ' '));
    return decodeCharset(bytes, charset);
  });
}
