import { gunzipSync } from 'node:zlib';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { CrewMembership, SessionUser } from '~/lib/auth/types';
import type { Insertable } from 'kysely';
import type { BaselineBandsTable } from '~/lib/db/database';
import { expandTrendResponse, type CompactTrendResponse } from '~/lib/trends/trend-compact';
import { createTrendAnswers } from '~/lib/trends/trend-answers';
import { answerTrendRequest } from '~/lib/trends/trends.routes';
import { countingQueries, openTestDb, truncateAll } from '../test-database';
import { addSamples, makeCrewWithRoles } from './decision-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

/** The size the wear chart's answer must stay under for three elements × 200 samples, gzipped. */
const BUDGET_BYTES = 40 * 1024;

function localsOf(userId: string, crewId: string): { user: SessionUser; crew: CrewMembership } {
  return {
    user: {
      id: userId,
      email: 'x@example.test',
      displayName: 'X',
      emailVerified: true,
      distanceUnit: 'km',
      lengthUnit: 'mm',
      temperatureUnit: 'C',
    },
    crew: { crewId, crewName: 'Valley school', role: 'rider' },
  };
}

function request(
  machineId: string,
  headers: Record<string, string> = {},
  query = 'measurands=Fe,Al,Si&basis=ppm&x=odometer',
): Request {
  return new Request(`http://127.0.0.1/api/trends/${machineId}?${query}`, { headers });
}

/** A machine with `count` samples of Fe, Al and Si, each judged against a band (as the engine stores them) and a watch on every tenth. */
async function machineWithHistory(count: number) {
  const c = await makeCrewWithRoles(db);
  const machine = await c.machine({ meter: 'km' });
  // Invented figures with a lab-like scatter: whole ppm for Al and Si, one decimal for Fe.
  const ids = await addSamples(
    db,
    c.crew.id,
    machine.id,
    c.rider.id,
    Array.from({ length: count }, (_, i) => ({
      drawnOn: new Date(Date.UTC(2016, 0, 1) + i * 14 * 86_400_000).toISOString().slice(0, 10),
      odometer: 1000 + i * 1500,
      readings: { Fe: Math.round((20 + 8 * Math.sin(i)) * 10) / 10, Al: 3 + (i % 4), Si: 6 + (i % 5) },
    })),
  );
  const bands: Insertable<BaselineBandsTable>[] = [];
  ids.forEach((sampleId, i) => {
    if (i < 4) return;
    for (const [measurand, mean] of [
      ['Fe', 20.137],
      ['Al', 4.513],
      ['Si', 8.071],
    ] as const) {
      const spread = mean * (0.11 + (i % 7) / 100);
      bands.push({
        sample_id: sampleId,
        measurand,
        basis: 'ppm',
        n: Math.min(i, 10),
        mean: mean + i / 97,
        lower_edge: mean - spread * 2.1,
        watch_above: mean + spread * 2.1,
        act_from: mean + spread * 3.7,
        to_reported: 1,
        source: i < 8 ? 'crew' : 'own',
        source_label: i < 8 ? 'from the crew’s other 450 cc liquid-cooled singles' : null,
        source_machines: i < 8 ? 3 : null,
      });
    }
  });
  if (bands.length) await db.insertInto('baseline_bands').values(bands).execute();
  const watched = ids.filter((_, i) => i % 10 === 9);
  if (watched.length)
    await db
      .insertInto('findings')
      .values(
        watched.map((sample_id) => ({
          sample_id,
          measurand: 'Al',
          level: 'watch' as const,
          rule_id: 'baseline-jump',
          numbers: '{}',
          sentence: 'Invented finding.',
        })),
      )
      .execute();
  return { c, machine, ids };
}

async function compactOf(res: Response): Promise<CompactTrendResponse> {
  const bytes = new Uint8Array(await res.arrayBuffer());
  const text =
    res.headers.get('content-encoding') === 'gzip'
      ? gunzipSync(bytes).toString('utf8')
      : new TextDecoder().decode(bytes);
  return JSON.parse(text) as CompactTrendResponse;
}

describe('GET /api/trends/[machineId]', () => {
  test('three elements × 200 samples answer under 40 KB gzipped, as numbers the chart expands to every point', async () => {
    const { c, machine } = await machineWithHistory(200);
    const res = await answerTrendRequest(db, {
      request: request(machine.id, { 'accept-encoding': 'gzip, deflate, br' }),
      machineId: machine.id,
      locals: localsOf(c.rider.id, c.crew.id),
    });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-encoding')).toBe('gzip');
    expect(res.headers.get('vary')).toMatch(/Accept-Encoding/);
    const sent = Number(res.headers.get('content-length'));
    expect(sent).toBeLessThan(BUDGET_BYTES);
    const compact = await compactOf(res);
    expect(compact.samples.id).toHaveLength(200);
    expect(compact.series.map((s) => s.value.filter((v) => v !== null).length)).toEqual([200, 200, 200]);
    const full = expandTrendResponse(compact);
    const al = full.series[1]!;
    expect(al.points[9]!.level).toBe('watch');
    expect(al.points[3]!.band).toBeNull();
    expect(al.points[5]!.band?.source).toBe('crew');
    expect(al.points[50]!.band?.source).toBe('own');
    expect(al.points[50]!.band?.mean).toBeCloseTo(4.513 + 50 / 97, 4);
    // Without gzip the same answer is sent as plain JSON.
    const plain = await answerTrendRequest(db, {
      request: request(machine.id),
      machineId: machine.id,
      locals: localsOf(c.rider.id, c.crew.id),
    });
    expect(plain.headers.get('content-encoding')).toBeNull();
    expect(await compactOf(plain)).toEqual(compact);
  });

  test('an unchanged machine answers 304 to its entity tag; a new reading changes the tag and answers 200', async () => {
    const { c, machine, ids } = await machineWithHistory(12);
    const locals = localsOf(c.rider.id, c.crew.id);
    const first = await answerTrendRequest(db, { request: request(machine.id), machineId: machine.id, locals });
    const etag = first.headers.get('etag')!;
    expect(etag).toMatch(/^W\/"[A-Za-z0-9_-]+"$/);
    expect(first.headers.get('cache-control')).toBe('private, no-cache');

    const again = await answerTrendRequest(db, {
      request: request(machine.id, { 'if-none-match': etag }),
      machineId: machine.id,
      locals,
    });
    expect(again.status).toBe(304);
    expect(await again.text()).toBe('');
    expect(again.headers.get('etag')).toBe(etag);
    // The tag is weak: the gzipped answer carries the same one, and a list with it matches too.
    const listed = await answerTrendRequest(db, {
      request: request(machine.id, { 'if-none-match': `"other", ${etag}`, 'accept-encoding': 'gzip' }),
      machineId: machine.id,
      locals,
    });
    expect(listed.status).toBe(304);

    await db
      .updateTable('readings')
      .set({ value: 99 })
      .where('sample_id', '=', ids[11]!)
      .where('measurand', '=', 'Fe')
      .execute();
    const changed = await answerTrendRequest(db, {
      request: request(machine.id, { 'if-none-match': etag }),
      machineId: machine.id,
      locals,
    });
    expect(changed.status).toBe(200);
    expect(changed.headers.get('etag')).not.toBe(etag);
    expect((await compactOf(changed)).series[0]!.value[11]).toBe(99);
  });

  test('an unchanged machine answers 304 after one query, before the answer is built', async () => {
    const { c, machine } = await machineWithHistory(20);
    const locals = localsOf(c.rider.id, c.crew.id);
    const first = await answerTrendRequest(db, { request: request(machine.id), machineId: machine.id, locals });
    const etag = first.headers.get('etag')!;
    // The 304 path sends the fingerprint query only.
    const { counted, sent } = countingQueries(db);
    const again = await answerTrendRequest(counted, {
      request: request(machine.id, { 'if-none-match': etag }),
      machineId: machine.id,
      locals,
    });
    expect(again.status).toBe(304);
    expect(again.headers.get('etag')).toBe(etag);
    expect(sent).toHaveLength(1);
    sent.length = 0;
    // With nothing kept, the fingerprint, then the chart's own queries (machine, samples, oil changes, readings,
    // findings, bands).
    const built = await answerTrendRequest(
      counted,
      { request: request(machine.id), machineId: machine.id, locals },
      createTrendAnswers(),
    );
    expect(built.status).toBe(200);
    expect(built.headers.get('etag')).toBe(etag);
    expect(sent.length).toBeGreaterThan(4);
    expect(await compactOf(built)).toEqual(await compactOf(first));
  });

  test('an answer already built for its tag is sent again after the fingerprint alone, the same bytes, gzipped or not', async () => {
    const { c, machine } = await machineWithHistory(30);
    const locals = localsOf(c.rider.id, c.crew.id);
    const answers = createTrendAnswers();
    const gz = { 'accept-encoding': 'gzip' };
    const first = await answerTrendRequest(
      db,
      { request: request(machine.id, gz), machineId: machine.id, locals },
      answers,
    );
    const firstBytes = new Uint8Array(await first.arrayBuffer());
    expect(first.headers.get('content-encoding')).toBe('gzip');
    expect(answers.bytes).toBeGreaterThan(firstBytes.byteLength);
    const { counted, sent } = countingQueries(db);
    for (let i = 0; i < 2; i++) {
      const again = await answerTrendRequest(
        counted,
        { request: request(machine.id, gz), machineId: machine.id, locals },
        answers,
      );
      expect(again.status).toBe(200);
      expect(again.headers.get('etag')).toBe(first.headers.get('etag'));
      // The kept gzip is sent whole each time (the response copies it, the store's copy stays intact).
      expect(new Uint8Array(await again.arrayBuffer())).toEqual(firstBytes);
    }
    expect(sent).toHaveLength(2);
    const plain = await answerTrendRequest(
      counted,
      { request: request(machine.id), machineId: machine.id, locals },
      answers,
    );
    expect(plain.headers.get('content-encoding')).toBeNull();
    expect(JSON.parse(await plain.text())).toEqual(JSON.parse(gunzipSync(firstBytes).toString('utf8')));
    expect(sent).toHaveLength(3);
  });

  test('a change to an element the chart does not show keeps the tag: the answer is the same', async () => {
    const { c, machine, ids } = await machineWithHistory(8);
    const locals = localsOf(c.rider.id, c.crew.id);
    const first = await answerTrendRequest(db, { request: request(machine.id), machineId: machine.id, locals });
    const etag = first.headers.get('etag')!;
    await db.insertInto('readings').values({ sample_id: ids[3]!, measurand: 'Cu', value: 4 }).execute();
    const same = await answerTrendRequest(db, {
      request: request(machine.id, { 'if-none-match': etag }),
      machineId: machine.id,
      locals,
    });
    expect(same.status).toBe(304);
    // Asked for copper too, the chart is another answer with another tag.
    const withCu = await answerTrendRequest(db, {
      request: request(machine.id, { 'if-none-match': etag }, 'measurands=Fe,Al,Si,Cu&basis=ppm&x=odometer'),
      machineId: machine.id,
      locals,
    });
    expect(withCu.status).toBe(200);
    const cu = (await compactOf(withCu)).series.find((s) => s.code === 'Cu');
    expect(cu?.value.filter((v) => v !== null)).toEqual([4]);
  });

  test.each([
    [
      'a reading removed',
      async (ids: string[]): Promise<void> => {
        await db.deleteFrom('readings').where('sample_id', '=', ids[3]!).where('measurand', '=', 'Si').execute();
      },
    ],
    [
      'a reading qualified',
      async (ids: string[]): Promise<void> => {
        await db
          .updateTable('readings')
          .set({ qualifier: '<' })
          .where('sample_id', '=', ids[5]!)
          .where('measurand', '=', 'Al')
          .execute();
      },
    ],
    [
      'a finding that changes level',
      async (ids: string[]): Promise<void> => {
        await db.updateTable('findings').set({ level: 'act' }).where('sample_id', '=', ids[9]!).execute();
      },
    ],
    [
      'a band removed',
      async (ids: string[]): Promise<void> => {
        await db.deleteFrom('baseline_bands').where('sample_id', '=', ids[11]!).execute();
      },
    ],
    [
      'a sample reviewed',
      async (ids: string[]): Promise<void> => {
        await db.updateTable('samples').set({ state: 'reviewed' }).where('id', '=', ids[2]!).execute();
      },
    ],
    [
      'a sample kept out of the baseline',
      async (ids: string[]): Promise<void> => {
        await db
          .updateTable('samples')
          .set({ in_baseline: false, baseline_note: 'Drawn after a top-up' })
          .where('id', '=', ids[2]!)
          .execute();
      },
    ],
  ] as const)('%s gives a new tag and a 200 with the data', async (_, change) => {
    const { c, machine, ids } = await machineWithHistory(12);
    const locals = localsOf(c.rider.id, c.crew.id);
    const first = await answerTrendRequest(db, { request: request(machine.id), machineId: machine.id, locals });
    const etag = first.headers.get('etag')!;
    await change(ids);
    const after = await answerTrendRequest(db, {
      request: request(machine.id, { 'if-none-match': etag }),
      machineId: machine.id,
      locals,
    });
    expect(after.status).toBe(200);
    expect(after.headers.get('etag')).not.toBe(etag);
    expect((await compactOf(after)).samples.id).toHaveLength(12);
  });

  test('a changed machine setting, an oil change or another query gives another tag', async () => {
    const { c, machine } = await machineWithHistory(6);
    const locals = localsOf(c.rider.id, c.crew.id);
    const tagOf = async (query?: string): Promise<string> =>
      (
        await answerTrendRequest(db, { request: request(machine.id, {}, query), machineId: machine.id, locals })
      ).headers.get('etag')!;
    const tags = [await tagOf()];
    tags.push(await tagOf('measurands=Fe,Al&basis=ppm&x=odometer'));
    tags.push(await tagOf('measurands=Fe,Al,Si&basis=rate&x=odometer'));
    await db.updateTable('machines').set({ meter: 'mi' }).where('id', '=', machine.id).execute();
    tags.push(await tagOf());
    await db
      .insertInto('oil_changes')
      .values({
        crew_id: c.crew.id,
        machine_id: machine.id,
        changed_on: '2026-01-02',
        odometer: 99_000,
        sae_grade: '15W-50',
        volume_l: 3.1,
        other_work: JSON.stringify([]),
        created_by: c.rider.id,
      })
      .execute();
    tags.push(await tagOf());
    expect(new Set(tags).size).toBe(tags.length);
    // The person asking does not enter the answer (units are the machine's), so another rider of the crew, or the
    // same one after changing their own units, gets the same tag for the same data.
    await db.updateTable('users').set({ distance_unit: 'mi' }).where('id', '=', c.rider.id).execute();
    expect(await tagOf()).toBe(tags.at(-1));
  });

  test.each([
    ['a forged tag', '"AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA"'],
    ['an unquoted tag', 'W/abc'],
    ['a tag of 100 KB', `"${'x'.repeat(100 * 1024)}"`],
    ['garbage', '\u0000,,,;;'],
  ])('If-None-Match with %s answers 200 with the data', async (_, header) => {
    const { c, machine } = await machineWithHistory(5);
    const res = await answerTrendRequest(db, {
      request: request(machine.id, { 'if-none-match': header.replace(/\u0000/g, '') }),
      machineId: machine.id,
      locals: localsOf(c.rider.id, c.crew.id),
    });
    expect(res.status).toBe(200);
    expect((await compactOf(res)).samples.id).toHaveLength(5);
  });

  test('another crew’s machine is 404, with or without its entity tag', async () => {
    const { c, machine } = await machineWithHistory(5);
    const other = await makeCrewWithRoles(db, 'Other');
    const own = await answerTrendRequest(db, {
      request: request(machine.id),
      machineId: machine.id,
      locals: localsOf(c.rider.id, c.crew.id),
    });
    const etag = own.headers.get('etag')!;
    for (const headers of [{}, { 'if-none-match': etag }, { 'if-none-match': '*' }] as Record<string, string>[]) {
      const res = await answerTrendRequest(db, {
        request: request(machine.id, headers),
        machineId: machine.id,
        locals: localsOf(other.rider.id, other.crew.id),
      });
      expect(res.status).toBe(404);
      expect(res.headers.get('etag')).toBeNull();
    }
  });

  test.each([
    ['one code repeated, then an unknown one', `measurands=${'Fe,'.repeat(34_000)}X`],
    ['one 100 KB word', `measurands=${'A'.repeat(100 * 1024)}`],
    ['100 KB of other keys', `measurands=Fe&${'junk=1&'.repeat(14_700)}`],
  ])('a 100 KB query string (%s) answers 400 with a message or ignores the rest', async (_, query) => {
    const { c, machine } = await machineWithHistory(3);
    const res = await answerTrendRequest(db, {
      request: request(machine.id, {}, query),
      machineId: machine.id,
      locals: localsOf(c.rider.id, c.crew.id),
    });
    if (query.startsWith('measurands=Fe&')) {
      // Unknown keys change nothing: the chart's own query is answered.
      expect(res.status).toBe(200);
      return;
    }
    expect(res.status).toBe(400);
    const body = (await res.json()) as { error: { message: string; fields: Record<string, string> } };
    expect(body.error.message).toMatch(/chart query/);
    expect(Object.keys(body.error.fields).every((k) => k.startsWith('measurands'))).toBe(true);
  });
});
