// Every route under src/pages must have at least one row in the role matrix, and every row must name a
// route that exists. The statuses themselves are checked against the built server in tests/e2e/role-matrix.test.ts.
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { ROLE_MATRIX, VISITORS } from '../integration/role-matrix.routes';

const pagesDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../src/pages');

/** src/pages/crews/[id].astro → /crews/[id]; index files name their folder. */
export function routeOf(file: string): string {
  const noExt = file.replace(/\\/g, '/').replace(/\.(astro|ts|js|mjs|md|mdx|html)$/, '');
  const route = `/${noExt}`.replace(/\/index$/, '');
  return route === '' ? '/' : route;
}

function walk(dir: string, prefix = ''): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const rel = prefix ? `${prefix}/${e.name}` : e.name;
    if (e.isDirectory()) return walk(path.join(dir, e.name), rel);
    // Files starting with _ are not routes in Astro.
    return /\.(astro|ts|js|mjs|md|mdx|html)$/.test(e.name) &&
      !e.name.startsWith('_') &&
      !rel.split('/').some((p) => p.startsWith('_'))
      ? [rel]
      : [];
  });
}

const routes = walk(pagesDir).map(routeOf).sort();

describe('role matrix coverage', () => {
  test.each([
    ['index.astro', '/'],
    ['crews/[id].astro', '/crews/[id]'],
    ['crews/index.astro', '/crews'],
    ['api/crews/[id]/members/[userId].ts', '/api/crews/[id]/members/[userId]'],
  ])('routeOf(%j) = %j', (file, route) => {
    expect(routeOf(file)).toBe(route);
  });

  test('src/pages has routes', () => {
    expect(routes.length).toBeGreaterThan(10);
  });

  test.each(routes)('%s has a row in tests/integration/role-matrix.routes.ts', (route) => {
    expect(ROLE_MATRIX.filter((r) => r.route === route).length, `add a row for ${route}`).toBeGreaterThan(0);
  });

  test('every row names an existing route and an expectation for each visitor', () => {
    for (const row of ROLE_MATRIX) {
      expect(routes, `row for ${row.route} names no route file`).toContain(row.route);
      expect(Object.keys(row.expect).sort()).toEqual([...VISITORS].sort());
    }
  });
});
