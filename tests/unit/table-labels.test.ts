// A data table becomes labelled cards on a phone by CSS alone (global.css: `content: attr(data-label)`), so the
// cards read right with scripts off. That only holds while every body cell carries its label in the markup:
// this walks the source of every page, component and island and names the cells that do not.
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

/** An opening tag: attributes, with `{…}` expressions (one level of braces) that may hold a `>`. */
const OPEN_TD = /<td\b(?:[^>{]|\{[^{}]*(?:\{[^{}]*\}[^{}]*)*\})*>/g;
const DATA_TABLE = /<table\b[^>]*\bdata-table\b[^>]*>([\s\S]*?)<\/table>/g;

/**
 * The `<td …>` openings of `.data-table`s with a heading row that carry no `data-label` (a cell spanning
 * columns is a note under its row and needs none). Tables without a `<thead>` name each row with a `<th>`.
 */
export function unlabelledCells(source: string): string[] {
  const out: string[] = [];
  for (const [, body] of source.matchAll(DATA_TABLE)) {
    if (!body || !/<thead\b/.test(body)) continue;
    for (const [tag] of body.matchAll(OPEN_TD))
      if (!/\bdata-label=/.test(tag) && !/\bcol[sS]pan=/.test(tag)) out.push(tag.replace(/\s+/g, ' ').slice(0, 100));
  }
  return out;
}

function sources(dir: string): string[] {
  return readdirSync(path.join(ROOT, dir), { withFileTypes: true, recursive: true })
    .filter((e) => e.isFile() && /\.(astro|tsx)$/.test(e.name))
    .map((e) => path.relative(ROOT, path.join(e.parentPath, e.name)))
    .sort();
}

describe('the checker reads table markup as intended', () => {
  test.each<[string, string, string[]]>([
    ['labelled cells', '<table class="data-table"><thead></thead><tr><td data-label="Drawn">x</td></tr></table>', []],
    [
      'a cell without a label',
      '<table class="data-table"><thead></thead><tr><td class="num">1</td></tr></table>',
      ['<td class="num">'],
    ],
    [
      'a JSX label',
      '<table className="data-table"><thead /><tr><td data-label={a ? "B" : "C"}>1</td></tr></table>',
      [],
    ],
    ['a note spanning the row', '<table class="data-table"><thead></thead><tr><td colspan="5">n</td></tr></table>', []],
    ['a table without headings', '<table class="data-table"><tr><th>Fe</th><td>iron</td></tr></table>', []],
    ['another kind of table', '<table class="plain"><thead></thead><tr><td>x</td></tr></table>', []],
  ])('%s', (_name, source, expected) => {
    expect(unlabelledCells(source)).toEqual(expected);
  });

  test('an expression with ">" is one tag, and it is found when unlabelled', () => {
    const source = '<table class="data-table"><thead></thead><tr><td class={a > b ? "x" : "y"}>1</td></tr></table>';
    expect(unlabelledCells(source)).toEqual(['<td class={a > b ? "x" : "y"}>']);
  });
});

describe('every data table in the app labels its cells in the markup', () => {
  const files = sources('src').filter((f) => /\bdata-table\b/.test(readFileSync(path.join(ROOT, f), 'utf8')));

  test('the walk finds the tables', () => {
    expect(files.length).toBeGreaterThan(10);
  });

  test.each(files)('%s', (file) => {
    expect(unlabelledCells(readFileSync(path.join(ROOT, file), 'utf8'))).toEqual([]);
  });
});
