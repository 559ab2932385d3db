// Sumpwise's own mail layout: one function renders the plain-text and the HTML version from the same
// words, so the two can never drift apart. The HTML is a single-column table with inline styles (mail
// clients drop <style> blocks and ignore flexbox), no images at all (so "images off" loses nothing), and
// the action link is also printed as a plain address for clients that strip buttons.

/** The words of one message; everything is plain text, escaped here. */
export interface MailLayoutInput {
  title: string;
  intro: string;
  paragraphs: string[];
  action?: { label: string; url: string };
  footer?: string;
}

export interface RenderedMail {
  text: string;
  html: string;
}

// Colours from tailwind.config.cjs: steel-900, steel-700, steel-500, steel-50, ink, ink-soft, paper, line.
const COLOURS = {
  band: '#0f2536',
  action: '#1f4560',
  accent: '#3d6f91',
  panel: '#eef4f8',
  ink: '#16202a',
  inkSoft: '#3a4a5a',
  paper: '#f7f5f0',
  line: '#d4cec2',
} as const;

const FONT = "'Atkinson Hyperlegible Next', Verdana, Arial, sans-serif";

/**
 * A link whose text is an address: it may break anywhere, so a 200-character unsubscribe address wraps inside a
 * phone's 390 px instead of pushing the message sideways (break-all for clients that know only word-break,
 * overflow-wrap for the rest; common practice, no published source).
 */
export const WRAPPING_LINK_STYLE = `color:${COLOURS.action};text-decoration:underline;word-break:break-all;overflow-wrap:anywhere;`;

const DEFAULT_FOOTER =
  'You receive this because of your Sumpwise account. If you did not expect it, you can ignore it.';

/** Escapes text for HTML element content and double-quoted attribute values. */
export function escapeHtml(value: string): string {
  return value
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/** Renders a message in the Sumpwise layout as a plain-text and an HTML version. */
export function renderMailLayout(input: MailLayoutInput): RenderedMail {
  if (input.action) assertWebUrl(input.action.url);
  const footer = input.footer ?? DEFAULT_FOOTER;
  return { text: renderText(input, footer), html: renderHtml(input, footer) };
}

// A link in a mail must be a web address: a javascript: or data: URL in a button is an attack.
function assertWebUrl(url: string): void {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    throw new Error(`mail action url is not a valid URL: ${url}`);
  }
  if (parsed.protocol !== 'https:' && parsed.protocol !== 'http:') {
    throw new Error(`mail action url must be http(s): ${url}`);
  }
}

function renderText(input: MailLayoutInput, footer: string): string {
  const lines: string[] = [input.title, '='.repeat(Math.min(input.title.length, 72)), '', input.intro, ''];
  for (const p of input.paragraphs) lines.push(p, '');
  // The address stands alone on its line so clients make it clickable and nothing wraps it.
  if (input.action) lines.push(`${input.action.label}:`, input.action.url, '');
  lines.push('--', footer, 'Sumpwise · used-oil analysis for your engines', '');
  return lines.join('\n');
}

function renderHtml(input: MailLayoutInput, footer: string): string {
  const p = (text: string, extra = '') =>
    `<p style="margin:0 0 16px 0;font-family:${FONT};font-size:16px;line-height:24px;color:${COLOURS.ink};overflow-wrap:anywhere;${extra}">${escapeHtml(text)}</p>`;
  const action = input.action
    ? `
          <table role="presentation" cellpadding="0" cellspacing="0" border="0" style="margin:8px 0 16px 0;">
            <tr>
              <td bgcolor="${COLOURS.action}" style="background-color:${COLOURS.action};border-radius:6px;">
                <a href="${escapeHtml(input.action.url)}" style="display:inline-block;padding:14px 24px;font-family:${FONT};font-size:17px;font-weight:bold;line-height:20px;color:#ffffff;text-decoration:none;border-radius:6px;">${escapeHtml(input.action.label)}</a>
              </td>
            </tr>
          </table>
          ${p('If the button does not work, copy this address into your browser:', `font-size:14px;line-height:20px;color:${COLOURS.inkSoft};margin-bottom:4px;`)}
          <p style="margin:0 0 16px 0;font-family:${FONT};font-size:14px;line-height:20px;word-break:break-all;"><a href="${escapeHtml(input.action.url)}" style="color:${COLOURS.accent};word-break:break-all;overflow-wrap:anywhere;">${escapeHtml(input.action.url)}</a></p>`
    : '';
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="color-scheme" content="light">
<title>${escapeHtml(input.title)}</title>
</head>
<body style="margin:0;padding:0;background-color:${COLOURS.paper};">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" border="0" bgcolor="${COLOURS.paper}" style="background-color:${COLOURS.paper};">
  <tr>
    <td align="center" style="padding:24px 12px;">
      <table role="presentation" width="100%" cellpadding="0" cellspacing="0" border="0" style="max-width:560px;border:1px solid ${COLOURS.line};border-radius:8px;background-color:#ffffff;">
        <tr>
          <td bgcolor="${COLOURS.band}" style="background-color:${COLOURS.band};border-bottom:4px solid ${COLOURS.accent};border-radius:8px 8px 0 0;padding:16px 24px;font-family:${FONT};font-size:20px;font-weight:bold;line-height:24px;color:#ffffff;">Sumpwise</td>
        </tr>
        <tr>
          <td style="padding:24px;">
          <h1 style="margin:0 0 16px 0;font-family:${FONT};font-size:24px;line-height:30px;color:${COLOURS.band};">${escapeHtml(input.title)}</h1>
          ${p(input.intro)}
          ${input.paragraphs.map((text) => p(text)).join('\n          ')}
          ${action}
          </td>
        </tr>
        <tr>
          <td bgcolor="${COLOURS.panel}" style="background-color:${COLOURS.panel};border-top:1px solid ${COLOURS.line};border-radius:0 0 8px 8px;padding:16px 24px;font-family:${FONT};font-size:13px;line-height:19px;color:${COLOURS.inkSoft};">${escapeHtml(footer)}<br>Sumpwise · used-oil analysis for your engines</td>
        </tr>
      </table>
    </td>
  </tr>
</table>
</body>
</html>
`;
}
