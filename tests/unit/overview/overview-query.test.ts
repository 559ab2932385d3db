import { describe, expect, test } from 'vitest';
import { DEFAULT_OVERVIEW_QUERY, buildOverviewHref, parseOverviewQuery, toggleSort } from '~/lib/overview/overview';

describe('parseOverviewQuery', () => {
  test.each([
    ['', DEFAULT_OVERVIEW_QUERY, []],
    ['sort=name', { ...DEFAULT_OVERVIEW_QUERY, sort: 'name', dir: 'asc' }, []],
    ['sort=last-sample', { ...DEFAULT_OVERVIEW_QUERY, sort: 'last-sample', dir: 'desc' }, []],
    ['sort=name&dir=desc', { ...DEFAULT_OVERVIEW_QUERY, sort: 'name', dir: 'desc' }, []],
    [
      'level=act&call=shorten&climbing=1&q=%20Heron%20&page=3',
      { ...DEFAULT_OVERVIEW_QUERY, level: 'act', call: 'shorten', climbing: true, q: 'Heron', page: 3 },
      [],
    ],
    ['level=none', { ...DEFAULT_OVERVIEW_QUERY, level: 'none' }, []],
    ['climbing=on', { ...DEFAULT_OVERVIEW_QUERY, climbing: true }, []],
    ['climbing=0', DEFAULT_OVERVIEW_QUERY, []],
    [
      'sort=price&dir=up&level=red&call=later&climbing=maybe&page=0',
      DEFAULT_OVERVIEW_QUERY,
      ['sort', 'dir', 'level', 'call', 'climbing', 'page'],
    ],
    ['page=2.5', DEFAULT_OVERVIEW_QUERY, ['page']],
    ['page=-1', DEFAULT_OVERVIEW_QUERY, ['page']],
    ['level=', DEFAULT_OVERVIEW_QUERY, []],
    [`q=${'x'.repeat(200)}`, { ...DEFAULT_OVERVIEW_QUERY, q: 'x'.repeat(80) }, []],
  ] as const)('%j', (search, query, ignored) => {
    expect(parseOverviewQuery(new URLSearchParams(search))).toEqual({ query, ignored });
  });
});

describe('buildOverviewHref and toggleSort', () => {
  const q = { ...DEFAULT_OVERVIEW_QUERY, page: 4, level: 'watch' as const };
  test.each([
    [DEFAULT_OVERVIEW_QUERY, {}, '/overview'],
    [q, {}, '/overview?level=watch'],
    [q, { page: 5 }, '/overview?level=watch&page=5'],
    [q, toggleSort(q, 'name'), '/overview?sort=name&level=watch'],
    [
      { ...q, sort: 'name' as const, dir: 'asc' as const },
      toggleSort({ ...q, sort: 'name', dir: 'asc' }, 'name'),
      '/overview?sort=name&dir=desc&level=watch',
    ],
    [q, toggleSort(q, 'level'), '/overview?dir=asc&level=watch'],
    [DEFAULT_OVERVIEW_QUERY, { q: 'Old Bruin', climbing: true }, '/overview?climbing=1&q=Old+Bruin'],
  ])('%j + %j → %s', (query, change, href) => {
    expect(buildOverviewHref(query, change)).toBe(href);
  });

  test('every href parses back to the query it was built from', () => {
    const built = {
      ...DEFAULT_OVERVIEW_QUERY,
      sort: 'due' as const,
      dir: 'desc' as const,
      call: 'hold' as const,
      climbing: true,
      q: 'a&b',
      page: 2,
    };
    const href = buildOverviewHref(built, { page: 2 });
    expect(parseOverviewQuery(new URL(href, 'http://x').searchParams).query).toEqual(built);
  });
});
