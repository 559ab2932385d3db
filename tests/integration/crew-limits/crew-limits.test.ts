import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { addMember, makeUser } from '../factories';
import { makeImportCrew, makeSample } from '../lab-import/lab-import-fixtures';
import { saveCrewLimits } from '~/lib/crew-limits/crew-limits.service';
import type { LimitValues } from '~/lib/crew-limits/crew-limits';

const db = openTestDb();
afterAll(() => db.destroy());

let crewId = '';
let leadId = '';
let mechanicId = '';
let sampleId = '';
const meta = { ip: '127.0.0.1' };
const lead = () => ({ userId: leadId, membership: { crewId, crewName: 'Valley school', role: 'lead' as const } });

beforeEach(async () => {
  await truncateAll(db);
  const c = await makeImportCrew(db);
  crewId = c.crewId;
  leadId = c.userId;
  const mech = await makeUser(db);
  await addMember(db, crewId, mech.id, 'mechanic');
  mechanicId = mech.id;
  const s = await makeSample(db, crewId, c.machineId, leadId, 'LIM-1', {
    drawnOn: '2026-02-01',
    odometer: 1000,
    distanceOnOil: 1000,
  });
  sampleId = s.id;
  await db.updateTable('samples').set({ state: 'results_in' }).where('id', '=', sampleId).execute();
  // Iron 60 ppm: steady against the default limit of 100 ppm (watch from 80), act against a crew limit of 50.
  await db
    .insertInto('readings')
    .values([{ sample_id: sampleId, measurand: 'Fe', value: 60, qualifier: null, lab_import_id: null }])
    .execute();
});

const fixedLimitFindings = () =>
  db
    .selectFrom('findings')
    .select(['measurand', 'level'])
    .where('sample_id', '=', sampleId)
    .where('rule_id', '=', 'fixed-limit')
    .execute();
const limitRows = () =>
  db.selectFrom('crew_limits').select(['measurand', 'act_at', 'updated_by']).where('crew_id', '=', crewId).execute();
const auditRows = () =>
  db
    .selectFrom('audit_events')
    .select(['kind', 'detail', 'actor_user_id'])
    .where('crew_id', '=', crewId)
    .where('kind', '=', 'alert_limits_changed')
    .execute();

describe('saveCrewLimits', () => {
  test('a lead lowers the iron limit: stored, audited, and the sample is judged again in the same save', async () => {
    expect(await fixedLimitFindings()).toEqual([]);
    const r = await saveCrewLimits(db, lead(), { Fe: 50 } as LimitValues, meta);
    expect(r).toEqual({ ok: true, value: { changed: 1, machinesJudged: 1 } });
    expect(await limitRows()).toEqual([{ measurand: 'Fe', act_at: 50, updated_by: leadId }]);
    expect(await fixedLimitFindings()).toEqual([{ measurand: 'Fe', level: 'act' }]);
    const audit = await auditRows();
    expect(audit).toHaveLength(1);
    expect(audit[0]!.actor_user_id).toBe(leadId);
    expect(JSON.stringify(audit[0]!.detail)).toContain('Iron: default 100 → 50 ppm');
  });

  test('clearing the box goes back to the default: the row is removed and the finding goes with it', async () => {
    await saveCrewLimits(db, lead(), { Fe: 50 } as LimitValues, meta);
    const r = await saveCrewLimits(db, lead(), { Fe: null } as LimitValues, meta);
    expect(r).toEqual({ ok: true, value: { changed: 1, machinesJudged: 1 } });
    expect(await limitRows()).toEqual([]);
    expect(await fixedLimitFindings()).toEqual([]);
    expect(await auditRows()).toHaveLength(2);
  });

  test('typing the default or saving the same figures changes nothing and records nothing', async () => {
    expect(await saveCrewLimits(db, lead(), { Fe: 100, Si: 20 } as LimitValues, meta)).toEqual({
      ok: true,
      value: { changed: 0, machinesJudged: 0 },
    });
    expect(await limitRows()).toEqual([]);
    expect(await auditRows()).toEqual([]);
  });

  test('a mechanic is refused and nothing is written', async () => {
    const r = await saveCrewLimits(
      db,
      { userId: mechanicId, membership: { crewId, crewName: 'Valley school', role: 'mechanic' } },
      { Fe: 50 } as LimitValues,
      meta,
    );
    expect(r).toMatchObject({ ok: false, status: 403 });
    expect(await limitRows()).toEqual([]);
    expect(await auditRows()).toEqual([]);
  });

  test('no membership answers not found', async () => {
    expect(
      await saveCrewLimits(db, { userId: leadId, membership: null }, { Fe: 50 } as LimitValues, meta),
    ).toMatchObject({ ok: false, status: 404 });
  });

  test('the KV100 change limit is stored under KV100 and read by the recompute', async () => {
    const r = await saveCrewLimits(db, lead(), { KV100: 10 } as LimitValues, meta);
    expect(r).toMatchObject({ ok: true, value: { changed: 1 } });
    expect(await limitRows()).toEqual([{ measurand: 'KV100', act_at: 10, updated_by: leadId }]);
  });
});
