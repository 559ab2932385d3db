/**
 * Splits free text (a lab file's name, a mail subject) into runs, marking the tokens that must not break across
 * lines at their hyphens: ISO dates (2026-03-02), bottle codes (SW-1041) and SAE grades (10W-40, 5W-30). A page
 * wraps the marked runs in a `nowrap` span; the text itself is unchanged, so copying and searching still work.
 */
export interface TextRun {
  text: string;
  keep: boolean;
}

const TOKEN = /\d{4}-\d{2}-\d{2}|\b[A-Z]{2,}-\d{2,}\b|\b\d{1,2}W-\d{2,3}\b/g;

export function keepTogether(text: string): TextRun[] {
  const out: TextRun[] = [];
  let at = 0;
  for (const m of text.matchAll(TOKEN)) {
    if (m.index > at) out.push({ text: text.slice(at, m.index), keep: false });
    out.push({ text: m[0], keep: true });
    at = m.index + m[0].length;
  }
  if (at < text.length) out.push({ text: text.slice(at), keep: false });
  return out;
}
