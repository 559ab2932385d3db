// The layout rules of DEVELOPERS.md, checked over the source tree so they hold without anyone remembering
// them: queries live in repositories, pages stay short, imports use the ~/ alias, and comments explain the
// code rather than where a change came from.
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const SOURCE = /\.(ts|tsx|astro|mjs|cjs|js)$/;
const SKIP = new Set(['node_modules', 'dist', '.astro', '.data', 'fixtures', 'screenshots', 'results']);

/** Source files under `dir` (relative to the project root, with forward slashes). */
function sourceFiles(dir: string): string[] {
  const walk = (rel: string): string[] =>
    readdirSync(path.join(ROOT, rel), { withFileTypes: true }).flatMap((e) => {
      const child = `${rel}/${e.name}`;
      if (e.isDirectory()) return SKIP.has(e.name) ? [] : walk(child);
      return SOURCE.test(e.name) ? [child] : [];
    });
  return walk(dir).sort();
}

const read = (file: string) => readFileSync(path.join(ROOT, file), 'utf8');

/** `file:line: text` for every line of `file` that `matches`. */
function offendingLines(file: string, matches: (line: string) => boolean): string[] {
  return read(file)
    .split('\n')
    .flatMap((line, i) => (matches(line) ? [`${file}:${i + 1}: ${line.trim().slice(0, 140)}`] : []));
}

const isComment = (line: string) => /^\s*(\/\/|\/?\*|<!--|\{\/\*)/.test(line);

/** A Kysely query builder call or a raw `sql` template, in code rather than in a comment. */
export function isQueryLine(line: string): boolean {
  if (isComment(line)) return false;
  return /\.(selectFrom|insertInto|updateTable|deleteFrom)\(/.test(line) || /\bsql\s*(<.*>)?\s*`/.test(line);
}

/** An import, re-export or dynamic import whose path climbs three folders or more. */
export function climbsTooFar(line: string): boolean {
  return /(\bfrom\s*|\bimport\s*\(\s*|^\s*import\s*)['"](\.\.\/){3,}/.test(line);
}

/** A comment or text that points at a ticket or at how the work was split, instead of explaining the code. */
export function citesWorkItem(line: string): boolean {
  return /\bissues?\s*(#\s*)?\d+\b/i.test(line) || /\bissue\s*#/i.test(line) || /\bparallel\s+edits?\b/i.test(line);
}

describe('the rules read lines as intended', () => {
  test.each([
    ["  const rows = await db.selectFrom('samples').selectAll().execute();", true],
    ['  await trx.insertInto(`audit_events`).values(row).execute();', true],
    ["    .updateTable('machines')", true],
    ["  await db.deleteFrom('sessions').where('id', '=', id).execute();", true],
    ['  const { rows } = await sql`select 1`.execute(db);', true],
    ['  const { rows } = await sql<{ n: number }>`select count(*) as n from samples`.execute(db);', true],
    ['// every selectFrom( call lives in a repository', false],
    [' * sql`…` templates too', false],
    ["import { sql } from 'kysely';", false],
    ['const mysql = `text`;', false],
  ])('isQueryLine(%j) is %s', (line, expected) => {
    expect(isQueryLine(line)).toBe(expected);
  });

  test.each([
    ["import { getDb } from '../../../lib/db';", true],
    ["import type { Sample } from '../../../../lib/samples/samples';", true],
    ["export { x } from '../../../x';", true],
    ["const m = await import('../../../lib/config');", true],
    ["import '../../../styles/global.css';", true],
    ["import { getDb } from '../../lib/db';", false],
    ["import { getDb } from '~/lib/db';", false],
    ["const p = path.join(root, '../../../x');", false],
  ])('climbsTooFar(%j) is %s', (line, expected) => {
    expect(climbsTooFar(line)).toBe(expected);
  });

  test.each([
    ['// Added for issue 12: the import preview.', true],
    ['// see Issue #7', true],
    ['/* issues 14 and 20 */', true],
    ['// kept apart to avoid parallel edits', true],
    ['// the lab may issue a second report for the same bottle', false],
    ['// ASTM D7720-11 section 6', false],
    ['// tissue 3 mm', false],
  ])('citesWorkItem(%j) is %s', (line, expected) => {
    expect(citesWorkItem(line)).toBe(expected);
  });
});

describe('house rules over the source tree', () => {
  const src = sourceFiles('src');

  test('src has files to check', () => {
    expect(src.length).toBeGreaterThan(100);
  });

  test('queries live only in *.repository.ts (migrations, scripts and tests are outside src)', () => {
    const outside = src.filter((f) => !f.endsWith('.repository.ts'));
    expect(outside.flatMap((f) => offendingLines(f, isQueryLine))).toEqual([]);
  });

  test('no file in src/pages is over 120 lines: pages render view models built in src/lib', () => {
    const long = src
      .filter((f) => f.startsWith('src/pages/'))
      .map((f) => ({ f, lines: read(f).replace(/\n$/, '').split('\n').length }))
      .filter((x) => x.lines > 120)
      .map((x) => `${x.f}: ${x.lines} lines`);
    expect(long).toEqual([]);
  });

  test("no import in src climbs more than two folders: use the '~/' alias", () => {
    expect(src.flatMap((f) => offendingLines(f, climbsTooFar))).toEqual([]);
  });

  test('no comment cites a ticket number or how the work was split', () => {
    const self = 'tests/unit/house-rules.test.ts';
    const files = ['src', 'tests', 'scripts', 'migrations', 'sample-data']
      .flatMap(sourceFiles)
      .concat(['astro.config.mjs', 'tailwind.config.cjs', 'eslint.config.js', '.ci/run'])
      .filter((f) => f !== self);
    expect(files.flatMap((f) => offendingLines(f, citesWorkItem))).toEqual([]);
  });
});
