import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { DEFAULT_OVERVIEW_QUERY, OVERVIEW_PAGE_SIZE, type OverviewQuery } from '~/lib/overview/overview';
import { loadMachineSummary, loadOverview } from '~/lib/overview/overview.service';
import { loadCrewHome } from '~/lib/home/home.service';
import { addSamples, makeCrewWithRoles } from '../trends/decision-fixtures';

const db = openTestDb();
let crewId = '';
let otherCrewId = '';
const ids: Record<string, string> = {};

// One crew of four named machines (each telling a small story) plus 116 plain ones for paging, and a second
// crew whose machine must never show.
beforeAll(async () => {
  await truncateAll(db);
  const c = await makeCrewWithRoles(db, 'Overview crew');
  crewId = c.crew.id;
  const mk = async (name: string) => {
    const m = await c.machine({ name });
    ids[name] = m.id;
    return m.id;
  };
  await addSamples(db, crewId, await mk('Alder'), c.rider.id, [
    { drawnOn: '2026-01-01', odometer: 1000, findings: [{ measurand: 'Al', level: 'act', ruleId: 'baseline-jump' }] },
    // The latest sample decides: steady now.
    { drawnOn: '2026-03-01', odometer: 2000, call: { call: 'stretch', nextSampleOn: '2026-09-01' } },
  ]);
  await addSamples(db, crewId, await mk('Birch'), c.rider.id, [
    {
      drawnOn: '2026-02-01',
      odometer: 5000,
      findings: [
        { measurand: 'Al', level: 'watch', ruleId: 'climbing-trend' },
        { measurand: 'Fe', level: 'watch', ruleId: 'climbing-trend' },
      ],
      call: { call: 'shorten', nextSampleOn: '2026-02-20' },
    },
  ]);
  await addSamples(db, crewId, await mk('Cedar'), c.rider.id, [
    {
      drawnOn: '2026-02-15',
      odometer: 7000,
      findings: [{ measurand: 'Na', level: 'act', ruleId: 'coolant-markers' }],
      call: { call: 'shorten', nextSampleOn: '2026-03-01' },
    },
    { drawnOn: '2026-04-01', odometer: 7500, state: 'shipped' },
  ]);
  await mk('Dogwood');
  for (let i = 0; i < 116; i++) await c.machine({ name: `Plain ${String(i).padStart(3, '0')}` });
  const other = await makeCrewWithRoles(db, 'Other crew');
  otherCrewId = other.crew.id;
  await addSamples(db, otherCrewId, (await other.machine({ name: 'Aaa other' })).id, other.rider.id, [
    { drawnOn: '2026-01-01', odometer: 1, findings: [{ measurand: 'Fe', level: 'act', ruleId: 'fixed-limit' }] },
  ]);
}, 60_000);
afterAll(() => db.destroy());

const q = (over: Partial<OverviewQuery>) => ({ ...DEFAULT_OVERVIEW_QUERY, ...over });

describe('loadOverview', () => {
  test.each([
    ['worst level first', q({}), ['Cedar', 'Birch', 'Alder']],
    ['names A to Z', q({ sort: 'name', dir: 'asc' }), ['Alder', 'Birch', 'Cedar', 'Dogwood']],
    ['most recent sample first', q({ sort: 'last-sample', dir: 'desc' }), ['Alder', 'Cedar', 'Birch']],
    ['call order shorten, hold, stretch', q({ sort: 'call', dir: 'asc' }), ['Birch', 'Cedar', 'Alder']],
    ['due soonest first', q({ sort: 'due', dir: 'asc' }), ['Birch', 'Cedar', 'Alder']],
  ])('%s', async (_n, query, firstNames) => {
    const page = await loadOverview(db, crewId, query);
    expect(page.rows.slice(0, firstNames.length).map((r) => r.name)).toEqual(firstNames);
    expect(page.total).toBe(120);
  });

  test.each([
    ['act', q({ level: 'act' }), ['Cedar']],
    ['watch', q({ level: 'watch' }), ['Birch']],
    ['steady', q({ level: 'steady' }), ['Alder']],
    ['climbing', q({ climbing: true }), ['Birch']],
    ['call stretch', q({ call: 'stretch' }), ['Alder']],
    ['name', q({ q: 'ced' }), ['Cedar']],
    ['name with a LIKE wildcard is literal', q({ q: '%' }), []],
  ])('filter %s', async (_n, query, names) => {
    const page = await loadOverview(db, crewId, query);
    expect(page.rows.map((r) => r.name)).toEqual(names);
    expect(page.total).toBe(names.length);
  });

  test('rows carry the last sample with results, climbing elements and the call', async () => {
    const page = await loadOverview(db, crewId, q({ q: 'Birch' }));
    expect(page.rows[0]).toMatchObject({
      worst: 'watch',
      climbing: ['Al', 'Fe'],
      call: { kind: 'shorten', source: 'engine', nextSampleOn: '2026-02-20' },
      topFinding: { ruleId: 'climbing-trend' },
    });
    const cedar = (await loadOverview(db, crewId, q({ q: 'Cedar' }))).rows[0]!;
    expect(cedar.lastSample!.drawnOn).toBe('2026-02-15');
  });

  test('pages of 50 cover every machine once, with none of the other crew', async () => {
    const seen: string[] = [];
    for (let page = 1; page <= 3; page++) {
      const p = await loadOverview(db, crewId, q({ sort: 'name', dir: 'asc', page }));
      expect(p.pages).toBe(Math.ceil(120 / OVERVIEW_PAGE_SIZE));
      seen.push(...p.rows.map((r) => r.machineId));
    }
    expect(seen).toHaveLength(120);
    expect(new Set(seen).size).toBe(120);
    const beyond = await loadOverview(db, crewId, q({ page: 9 }));
    expect(beyond.rows).toEqual([]);
    expect(beyond.total).toBe(120);
  });
});

describe('loadMachineSummary and the crew home', () => {
  test('summary: due by date from the latest call; another crew gets null', async () => {
    const s = await loadMachineSummary(db, crewId, ids['Birch']!, '2026-03-01');
    expect(s).toMatchObject({
      worst: 'watch',
      climbing: ['Al', 'Fe'],
      due: { due: true, reasons: ['date'], daysLeft: -9 },
    });
    await expect(loadMachineSummary(db, otherCrewId, ids['Birch']!, '2026-03-01')).resolves.toBeNull();
  });

  test('home: one card per machine with open findings, waiting results, shipped overdue after 21 days, and due machines', async () => {
    const home = await loadCrewHome(db, crewId, '2026-04-30');
    expect(home.cards.filter((c) => c.worst === 'act').map((c) => [c.machineName, c.main.rule_id])).toEqual([
      ['Cedar', 'coolant-markers'],
    ]);
    expect(new Set(home.cards.map((c) => c.machineId)).size).toBe(home.cards.length);
    expect(home.waiting.map((s) => s.machine_name).sort()).toEqual(['Alder', 'Alder', 'Birch', 'Cedar']);
    // Cedar's bottle was drawn (and so at the latest shipped) on 2026-04-01: 29 days by 2026-04-30.
    expect(home.overdue.map((s) => s.machine_name)).toEqual(['Cedar']);
    expect((await loadCrewHome(db, crewId, '2026-04-15')).overdue).toEqual([]);
    expect(home.due.map((m) => m.name).sort()).toEqual(['Birch', 'Cedar']);
    // Overdue by date sorts first and says by how much.
    const late = home.due.filter((m) => m.overdue);
    expect(late.length).toBeGreaterThan(0);
    expect(home.due.slice(0, late.length)).toEqual(late);
    for (const m of late) expect(m.overdue!.words).toMatch(/^due (today|\d+ (day|days|week|weeks|month|months) ago)$/);
    expect(home.progress.machines).toBeGreaterThan(0);
  });
});
