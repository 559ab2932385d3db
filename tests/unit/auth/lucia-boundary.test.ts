import { readFileSync, readdirSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { describe, expect, test } from 'vitest';

// Lucia v3 is deprecated upstream: it stays behind src/lib/auth/session.ts so that replacing it touches one
// file. This test fails when any other source file imports `lucia` or an `@lucia-auth/*` package.

const ROOT = join(__dirname, '..', '..', '..');
const ALLOWED = 'src/lib/auth/session.ts';
const SCANNED = ['src', 'scripts', 'migrations', 'tests'];
const SOURCE = /\.(ts|tsx|mts|js|mjs|astro)$/;

/** A static import, a re-export, a dynamic import or a require of lucia or an @lucia-auth package. */
const LUCIA_IMPORT =
  /(?:\bfrom\s*|\bimport\s*\(\s*|\brequire\s*\(\s*|^\s*import\s*)['"](?:lucia|@lucia-auth\/[^'"]+)['"]/m;

function sourceFiles(dir: string): string[] {
  return readdirSync(join(ROOT, dir), { recursive: true, encoding: 'utf8' })
    .filter((f) => SOURCE.test(f) && !f.split(sep).includes('node_modules'))
    .map((f) => join(dir, f).split(sep).join('/'));
}

describe('the Lucia boundary', () => {
  test.each([
    [`import { Lucia } from 'lucia';`, true],
    [`import type { Cookie } from "lucia";`, true],
    [`import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';`, true],
    [`export { Lucia } from 'lucia';`, true],
    [`const m = await import('lucia');`, true],
    [`import 'lucia';`, true],
    [`import { getLucia } from '~/lib/auth/session';`, false],
    [`// the session store is Lucia's`, false],
    [`import { x } from 'lucia-like-package';`, false],
  ])('the import pattern judges %j as an import of Lucia: %s', (line, expected) => {
    expect(LUCIA_IMPORT.test(line)).toBe(expected);
  });

  test('scans the sources, session.ts among them', () => {
    const files = SCANNED.flatMap(sourceFiles);
    expect(files).toContain(ALLOWED);
    expect(files.length).toBeGreaterThan(100);
  });

  test(`only ${ALLOWED} imports lucia or @lucia-auth/*`, () => {
    const self = relative(ROOT, __filename).split(sep).join('/');
    const offenders = SCANNED.flatMap(sourceFiles)
      .filter((f) => f !== ALLOWED && f !== self)
      .filter((f) => LUCIA_IMPORT.test(readFileSync(join(ROOT, f), 'utf8')));
    expect(offenders).toEqual([]);
    expect(LUCIA_IMPORT.test(readFileSync(join(ROOT, ALLOWED), 'utf8'))).toBe(true);
  });
});
