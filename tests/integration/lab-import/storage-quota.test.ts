import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { addMember, makeCrew, makeUser } from '../factories';
import { storeLabFile } from '~/lib/lab-import/lab-import.service';
import { sumCrewStorageBytes } from '~/lib/storage-quota/storage-quota.repository';

const db = openTestDb();
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

const csv = (n: number) => new TextEncoder().encode(`Bottle,Fe\nQ-${n},${n}\n${'x,1\n'.repeat(200)}`);

describe('per-crew storage quota', () => {
  test('a lab file that would take the crew past its quota is refused with a sentence and not kept; another crew is not affected', async () => {
    const [crew, other] = [await makeCrew(db, 'Full crew'), await makeCrew(db, 'Other crew')];
    const user = await makeUser(db);
    await addMember(db, crew.id, user.id, 'lead');
    await addMember(db, other.id, user.id, 'lead');
    const quotaBytes = 2 * csv(1).byteLength + 10;
    for (const n of [1, 2])
      expect(
        (await storeLabFile(db, { crewId: crew.id, userId: user.id, fileName: `r${n}.csv`, bytes: csv(n), quotaBytes }))
          .ok,
      ).toBe(true);
    const third = await storeLabFile(db, {
      crewId: crew.id,
      userId: user.id,
      fileName: 'r3.csv',
      bytes: csv(3),
      quotaBytes,
    });
    expect(third).toMatchObject({ ok: false, status: 413, code: 'quota_exceeded' });
    expect(third.ok ? '' : third.message).toMatch(
      /^Your crew has used 0 MB of its 0 MB for photos and lab files, so this file was not kept\./,
    );
    expect(await sumCrewStorageBytes(db, crew.id)).toBe(2 * csv(1).byteLength);
    expect(
      (await storeLabFile(db, { crewId: other.id, userId: user.id, fileName: 'r3.csv', bytes: csv(3), quotaBytes })).ok,
    ).toBe(true);
  });
});
