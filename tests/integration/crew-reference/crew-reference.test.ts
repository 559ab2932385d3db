// The crew reference against the real database: built only from the crew's own machines of the same engine,
// stored with its source and label, and judged again on a young machine when a peer's samples change.
// Invented figures throughout.
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { Kysely } from 'kysely';
import type { Database } from '~/lib/db/database';
import { findReferenceSamples } from '~/lib/findings/findings.repository';
import { recomputeFindings, recomputeMachineFindings } from '~/lib/findings/findings.service';
import { openTestDb, truncateAll } from '../test-database';
import { addSamples, makeCrewWithRoles } from '../trends/decision-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

const ENGINE = {
  engine_layout: 'single',
  displacement_cc: 450,
  cooling: 'liquid',
  shared_oil: true,
  meter: 'km',
} as unknown as Partial<Database['machines']>;
const LABEL = "from the crew's other 450 cc liquid-cooled singles";

type Crew = Awaited<ReturnType<typeof makeCrewWithRoles>>;

/** A machine of the crew with four samples, iron `fe` ppm after 3,000 km each, drawn in 2025; returns its sample ids. */
async function peer(c: Crew, fe: number, over: Partial<Database['machines']> = {}) {
  const m = await c.machine({ ...ENGINE, name: `Peer ${fe}`, ...over });
  const ids = await addSamples(
    db,
    c.crew.id,
    m.id,
    c.rider.id,
    [0, 1, 2, 3].map((i) => ({
      drawnOn: `2025-0${2 + 2 * i}-10`,
      odometer: 3000 * (i + 1),
      distanceOnOil: 3000,
      readings: { Fe: fe + (i % 2), Al: 3 },
    })),
  );
  await db.transaction().execute((trx) => recomputeMachineFindings(trx, m.id, null));
  return { machine: m, ids };
}

async function newMachine(c: Crew) {
  const m = await c.machine({ ...ENGINE, name: 'New 450' });
  const [id] = await addSamples(db, c.crew.id, m.id, c.rider.id, [
    { drawnOn: '2026-03-01', odometer: 3000, distanceOnOil: 3000, readings: { Fe: 16, Al: 3 } },
  ]);
  await db.transaction().execute((trx) => recomputeMachineFindings(trx, m.id, null));
  return { machine: m, sampleId: id! };
}

const feBand = (dbx: Kysely<Database>, sampleId: string) =>
  dbx
    .selectFrom('baseline_bands')
    .selectAll()
    .where('sample_id', '=', sampleId)
    .where('measurand', '=', 'Fe')
    .executeTakeFirst();

describe('crew reference', () => {
  test("never includes another crew's machines, even of the same engine", async () => {
    const a = await makeCrewWithRoles(db, 'Crew A');
    const b = await makeCrewWithRoles(db, 'Crew B');
    // Crew B runs three machines of the very same engine, wearing far faster.
    const others = [await peer(b, 90), await peer(b, 95), await peer(b, 100)];
    await peer(a, 14);
    await peer(a, 15);
    const fresh = await newMachine(a);
    // Two of its own crew's machines: no reference, whatever crew B runs.
    expect(await feBand(db, fresh.sampleId)).toBeUndefined();

    // The repository query itself is crew-scoped: crew B's machine ids asked under crew A bring nothing.
    expect(
      await findReferenceSamples(
        db,
        a.crew.id,
        others.map((o) => o.machine.id),
      ),
    ).toEqual([]);
    expect(
      await findReferenceSamples(
        db,
        b.crew.id,
        others.map((o) => o.machine.id),
      ),
    ).toHaveLength(12);

    // A third machine of the engine in crew A: the reference exists, from crew A's three machines only.
    const third = await peer(a, 16);
    await db.transaction().execute((trx) => recomputeMachineFindings(trx, fresh.machine.id, null));
    const band = await feBand(db, fresh.sampleId);
    expect(band).toMatchObject({ source: 'crew', source_label: LABEL, source_machines: 3, basis: 'rate' });
    // The last ten crew A samples at 3,000 km: iron 14–17 ppm, i.e. about 5 ppm per 1,000 km; crew B's 30 never enter.
    expect(Number(band!.mean)).toBeGreaterThan(4.5);
    expect(Number(band!.mean)).toBeLessThan(6);
    expect(third.ids).toHaveLength(4);
  });

  test('a machine of another engine (6 % larger, or air-cooled, or its own gearbox oil) does not count', async () => {
    const a = await makeCrewWithRoles(db, 'Crew A');
    await peer(a, 14);
    await peer(a, 15);
    await peer(a, 16, { displacement_cc: 478 });
    await peer(a, 16, { cooling: 'air' });
    await peer(a, 16, { shared_oil: false } as never);
    const fresh = await newMachine(a);
    expect(await feBand(db, fresh.sampleId)).toBeUndefined();
    await peer(a, 16, { displacement_cc: 470 });
    await db.transaction().execute((trx) => recomputeMachineFindings(trx, fresh.machine.id, null));
    expect(await feBand(db, fresh.sampleId)).toMatchObject({ source: 'crew', source_machines: 3 });
  });

  test("a peer's changed sample judges the young machine again in the same transaction", async () => {
    const a = await makeCrewWithRoles(db, 'Crew A');
    await peer(a, 14);
    await peer(a, 15);
    const fresh = await newMachine(a);
    // The third peer's samples arrive without judging anyone (as the fixture inserts them), then its sample is judged.
    const m = await a.machine({ ...ENGINE, name: 'Third' });
    const ids = await addSamples(db, a.crew.id, m.id, a.rider.id, [
      { drawnOn: '2025-05-01', odometer: 3000, distanceOnOil: 3000, readings: { Fe: 15, Al: 3 } },
    ]);
    expect(await feBand(db, fresh.sampleId)).toBeUndefined();
    await db.transaction().execute((trx) => recomputeFindings(trx, ids[0]!));
    expect(await feBand(db, fresh.sampleId)).toMatchObject({ source: 'crew', source_label: LABEL, source_machines: 3 });
    // A high reading on the new machine against that reference names it in the finding.
    await db
      .updateTable('readings')
      .set({ value: 60 })
      .where('sample_id', '=', fresh.sampleId)
      .where('measurand', '=', 'Fe')
      .execute();
    await db.transaction().execute((trx) => recomputeMachineFindings(trx, fresh.machine.id, null));
    const finding = await db
      .selectFrom('findings')
      .select(['level', 'sentence'])
      .where('sample_id', '=', fresh.sampleId)
      .where('measurand', '=', 'Fe')
      .where('rule_id', '=', 'baseline-jump')
      .executeTakeFirstOrThrow();
    expect(finding.sentence).toContain(LABEL);
    const call = await db
      .selectFrom('interval_calls')
      .select('reasons')
      .where('sample_id', '=', fresh.sampleId)
      .executeTakeFirstOrThrow();
    expect(JSON.stringify(call.reasons)).toContain(LABEL);
  });
});
