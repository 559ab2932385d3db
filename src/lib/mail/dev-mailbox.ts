// View helpers for the /dev/mailbox pages: pure functions, so they are tested without a server.

/** A piece of plain text, or a web address to show as a link. */
export type TextSegment = { kind: 'text'; value: string } | { kind: 'link'; value: string };

// Addresses end before whitespace, angle brackets and quotes; trailing sentence punctuation is not part of them.
const URL_PATTERN = /https?:\/\/[^\s<>"']+/g;

/** Splits plain text into text and http(s) links, so a page can render the links clickable. */
export function linkifyText(text: string): TextSegment[] {
  const segments: TextSegment[] = [];
  let last = 0;
  for (const match of text.matchAll(URL_PATTERN)) {
    let url = match[0];
    const trailing = /[.,;:!?)\]]+$/.exec(url)?.[0] ?? '';
    url = url.slice(0, url.length - trailing.length);
    const start = match.index;
    if (start > last) segments.push({ kind: 'text', value: text.slice(last, start) });
    segments.push({ kind: 'link', value: url });
    last = start + url.length;
  }
  if (last < text.length) segments.push({ kind: 'text', value: text.slice(last) });
  return segments;
}

/**
 * The HTML body prepared for a sandboxed srcdoc iframe: links open in a new tab (the frame itself may not
 * navigate to our pages, which refuse framing), and a policy forbids scripts and remote loads.
 */
export function prepareHtmlForFrame(html: string): string {
  const head =
    '<meta http-equiv="Content-Security-Policy" content="default-src \'none\'; style-src \'unsafe-inline\'; img-src data:">' +
    '<base target="_blank">';
  if (/<head[^>]*>/i.test(html)) return html.replace(/<head[^>]*>/i, (m) => `${m}${head}`);
  return `${head}${html}`;
}

/** Reads a mailbox id from the URL; null unless it is a plain positive integer. */
export function parseMailboxId(value: string | undefined): number | null {
  if (!value || !/^[1-9][0-9]{0,15}$/.test(value)) return null;
  const id = Number(value);
  return Number.isSafeInteger(id) ? id : null;
}
