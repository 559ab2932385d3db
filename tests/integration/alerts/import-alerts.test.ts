import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { loadAlertEnv, sendDailyDigests } from '~/lib/alerts/alerts.service';
import { verifyUnsubscribeToken } from '~/lib/alerts/unsubscribe-token';
import { confirmLabImport, storeLabFile } from '~/lib/lab-import/lab-import.service';
import { deliverDueMail } from '~/lib/mail/mail.service';
import { startMailRelay } from '~/lib/mail/relay';
import { createMailTransport } from '~/lib/mail/transport';
import { saveUserPreferences } from '~/lib/notification-preferences/notification-preferences.service';
import { bytesOf, makeSample } from '../lab-import/lab-import-fixtures';
import { openTestDb, truncateAll } from '../test-database';
import { importCsv, makeAlertCrew, outboxByRecipient, tokenFromHeaders } from './alert-fixtures';

const db = openTestDb();
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

// Invented figures. Al 60 ppm is above the default fixed limit of 20 ppm (DEFAULT_FIXED_LIMITS,
// src/lib/analysis/rule-definitions.ts, from the Petro-Canada Lubricants Handbook): an act finding.
const HEADER = 'Bottle,Sampled,Fe,Al,Si,Cu';
const ACT_CSV = `${HEADER}\nSW-1,2026-02-01,30,60,5,3\n`;
// Every figure far under its fixed limit, and one sample only (baseline still building): no finding at watch or act.
const STEADY_CSV = `${HEADER}\nSW-1,2026-02-01,10,2,3,1\n`;

describe('import alerts', () => {
  test('an import with an act finding queues exactly one message per recipient: rider who owns the machine, mechanic, lead', async () => {
    const c = await makeAlertCrew(db);
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-1');
    const summary = await importCsv(db, c.crewId, c.mechanic.id, ACT_CSV);
    const byTo = await outboxByRecipient(db, 'alert_import_findings');
    expect([...byTo.keys()].sort()).toEqual([c.lead.email, c.mechanic.email, c.rider.email].sort());
    for (const [to, rows] of byTo) {
      expect(rows, to).toHaveLength(1);
      const row = rows[0]!;
      expect(row.subject).toMatch(/^Act: lab results for Ridge 450 \(Valley school\)$/);
      expect(row.text_body).toMatch(/Act · Al/);
      expect(row.html_body).toMatch(/<a href="[^"]+\/machines\//);
      expect(row.headers['List-Unsubscribe-Post']).toBe('List-Unsubscribe=One-Click');
      // The token names this recipient, this crew and this kind.
      const scope = verifyUnsubscribeToken(tokenFromHeaders(row.headers), loadAlertEnv().secret);
      const userId = [c.lead, c.mechanic, c.rider].find((u) => u.email === to)!.id;
      expect(scope).toEqual({ userId, crewId: c.crewId, kind: 'import_findings' });
      expect(row.idempotency_key).toBe(`import-alert:${summary.importId}:${userId}`);
    }
    // The rider who does not own the machine and the other crew's lead hear nothing.
    expect(byTo.has(c.otherRider.email)).toBe(false);
    expect(byTo.has(c.otherLead.email)).toBe(false);
  });

  test('several machines with findings in one import still make one message per recipient, each listing theirs', async () => {
    const c = await makeAlertCrew(db);
    const second = await db
      .insertInto('machines')
      .values({
        crew_id: c.crewId,
        owner_user_id: c.otherRider.id,
        name: 'Fjord 690',
        engine_layout: 'single',
        cooling: 'liquid',
        meter: 'km',
        recommended_grades: JSON.stringify([{ grade: '10W-40', minC: -10, maxC: 40 }]),
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-1');
    await makeSample(db, c.crewId, second.id, c.otherRider.id, 'SW-2');
    await importCsv(db, c.crewId, c.lead.id, `${HEADER}\nSW-1,2026-02-01,30,60,5,3\nSW-2,2026-02-01,150,3,5,3\n`);
    const byTo = await outboxByRecipient(db, 'alert_import_findings');
    expect([...byTo.values()].every((rows) => rows.length === 1)).toBe(true);
    expect(byTo.size).toBe(4);
    const text = (email: string) => byTo.get(email)![0]!.text_body;
    expect(text(c.lead.email)).toContain('Ridge 450');
    expect(text(c.lead.email)).toContain('Fjord 690');
    expect(text(c.rider.email)).toContain('Ridge 450');
    expect(text(c.rider.email)).not.toContain('Fjord 690');
    expect(text(c.otherRider.email)).toContain('Fjord 690');
    expect(text(c.otherRider.email)).not.toContain('Ridge 450');
  });

  test('a machine with more samples at act than the mail spells out: the newest are listed, the counts cover all', async () => {
    const c = await makeAlertCrew(db);
    const days = ['2026-01-05', '2026-02-05', '2026-03-05', '2026-04-05', '2026-05-05'];
    for (const [i, day] of days.entries())
      await makeSample(db, c.crewId, c.machineId, c.rider.id, `SW-${i + 1}`, {
        drawnOn: day,
        odometer: 1000 * (i + 1),
      });
    const rows = days.map((day, i) => `SW-${i + 1},${day},30,60,5,3`).join('\n');
    await importCsv(db, c.crewId, c.lead.id, `${HEADER}\n${rows}\n`);

    // What the engine found, counted from the stored findings themselves.
    const levels = await db.selectFrom('findings').select('level').execute();
    const acts = levels.filter((f) => f.level === 'act').length;
    const watches = levels.filter((f) => f.level === 'watch').length;
    expect(acts).toBeGreaterThanOrEqual(days.length);
    const text = (await outboxByRecipient(db, 'alert_import_findings')).get(c.lead.email)![0]!.text_body;
    expect(text).toContain(`brought ${acts} at act${watches ? ` and ${watches} at watch` : ''} on Ridge 450`);
    expect(text).toContain('2 earlier samples of this import also have findings');
    for (const shown of ['SW-3', 'SW-4', 'SW-5']) expect(text).toContain(`Sample ${shown}, readings and findings`);
    for (const earlier of ['SW-1', 'SW-2']) expect(text).not.toContain(`bottle ${earlier},`);
  });

  test('an import with nothing at watch or act sends nothing', async () => {
    const c = await makeAlertCrew(db);
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-1');
    const summary = await importCsv(db, c.crewId, c.lead.id, STEADY_CSV);
    const levels = await db.selectFrom('findings').select('level').execute();
    expect(levels.every((f) => f.level === 'steady')).toBe(true);
    expect(summary.samplesWritten).toBe(1);
    expect((await outboxByRecipient(db)).size).toBe(0);
  });

  test('a rolled-back import queues nothing; confirming the same file twice queues nothing more', async () => {
    const c = await makeAlertCrew(db);
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-1');
    const stored = await storeLabFile(db, {
      crewId: c.crewId,
      userId: c.lead.id,
      fileName: 'a.csv',
      bytes: bytesOf(ACT_CSV),
    });
    if (!stored.ok) throw new Error(stored.message);
    await expect(
      db.transaction().execute(async (trx) => {
        const r = await confirmLabImport(trx, {
          crewId: c.crewId,
          userId: c.lead.id,
          labFileId: stored.value.labFileId,
          decisions: {},
        });
        expect(r.ok).toBe(true);
        throw new Error('the caller failed after the import');
      }),
    ).rejects.toThrow('the caller failed');
    expect(await db.selectFrom('mail_outbox').select('id').execute()).toHaveLength(0);
    expect(await db.selectFrom('alert_deliveries').select('dedupe_key').execute()).toHaveLength(0);

    const first = await confirmLabImport(db, {
      crewId: c.crewId,
      userId: c.lead.id,
      labFileId: stored.value.labFileId,
      decisions: {},
    });
    expect(first.ok).toBe(true);
    const again = await confirmLabImport(db, {
      crewId: c.crewId,
      userId: c.lead.id,
      labFileId: stored.value.labFileId,
      decisions: {},
    });
    expect(again.ok).toBe(false);
    expect(await db.selectFrom('mail_outbox').select('id').execute()).toHaveLength(3);
  });

  test('through the fake relay each recipient receives the message once, with text, HTML and the unsubscribe headers', async () => {
    const c = await makeAlertCrew(db);
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-1');
    await importCsv(db, c.crewId, c.lead.id, ACT_CSV);
    const relay = await startMailRelay({ db, port: 0 });
    const transport = createMailTransport(`smtp://127.0.0.1:${relay.port}`);
    try {
      const report = await deliverDueMail(db, { transport, from: 'Sumpwise <no-reply@sumpwise.test>' });
      expect(report).toEqual({ sent: 3, deferred: 0, failed: 0 });
      expect(await deliverDueMail(db, { transport, from: 'Sumpwise <no-reply@sumpwise.test>' })).toEqual({
        sent: 0,
        deferred: 0,
        failed: 0,
      });
    } finally {
      transport.close();
      await relay.close();
    }
    const received = await db.selectFrom('dev_mailbox').selectAll().orderBy('envelope_to').execute();
    expect(received.map((r) => r.envelope_to).sort()).toEqual([c.lead.email, c.mechanic.email, c.rider.email].sort());
    for (const r of received) {
      expect(r.text_body).toContain('Act · Al');
      expect(r.html_body).toContain('Act · Al');
      // Long header lines arrive folded (RFC 5322 §2.2.3); unfolded they are the header we set.
      const unfolded = r.raw.replace(/\r?\n[ \t]+/g, ' ');
      expect(unfolded).toMatch(
        /^List-Unsubscribe: <http[^>]+\/api\/unsubscribe\?token=[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+>\r?$/m,
      );
      expect(unfolded).toMatch(/^List-Unsubscribe-Post: List-Unsubscribe=One-Click\r?$/m);
    }
  });

  test('preferences: "daily digest" files the alert for the digest, "off" writes nothing, others are unaffected', async () => {
    const c = await makeAlertCrew(db);
    await saveUserPreferences(db, c.mechanic.id, [{ crewId: c.crewId, kind: 'import_findings', delivery: 'digest' }]);
    await saveUserPreferences(db, c.lead.id, [{ crewId: c.crewId, kind: 'import_findings', delivery: 'off' }]);
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-1');
    await importCsv(db, c.crewId, c.lead.id, ACT_CSV);
    expect([...(await outboxByRecipient(db)).keys()]).toEqual([c.rider.email]);
    const items = await db.selectFrom('alert_digest_items').selectAll().execute();
    expect(items.map((i) => i.user_id)).toEqual([c.mechanic.id]);

    const now = new Date('2030-01-02T06:30:00Z');
    expect(await sendDailyDigests(db, { now })).toEqual({ queued: 1, deferred: 0 });
    const digests = await db.selectFrom('mail_outbox').selectAll().where('kind', '=', 'alert_digest').execute();
    expect(digests).toHaveLength(1);
    expect(digests[0]).toMatchObject({
      to_address: c.mechanic.email,
      idempotency_key: `digest:${c.mechanic.id}:2030-01-02`,
    });
    expect(digests[0]!.text_body).toContain('Act · Al');
    expect(verifyUnsubscribeToken(tokenFromHeaders(digests[0]!.headers), loadAlertEnv().secret)).toEqual({
      userId: c.mechanic.id,
      crewId: null,
      kind: 'digest',
    });
    // The job running again the same day (a retry after a crash, a second worker) sends nothing more.
    expect(await sendDailyDigests(db, { now })).toEqual({ queued: 0, deferred: 0 });
    expect(await db.selectFrom('mail_outbox').select('id').where('kind', '=', 'alert_digest').execute()).toHaveLength(
      1,
    );
  });

  test("a digest item filed after the day's digest went out waits for the next day", async () => {
    const c = await makeAlertCrew(db);
    await saveUserPreferences(db, c.rider.id, [{ crewId: c.crewId, kind: 'import_findings', delivery: 'digest' }]);
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-1');
    await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-2', { drawnOn: '2026-03-01', odometer: 2000 });
    await importCsv(db, c.crewId, c.lead.id, ACT_CSV, 'first.csv');
    const day = new Date('2030-01-02T06:30:00Z');
    expect(await sendDailyDigests(db, { now: day })).toEqual({ queued: 1, deferred: 0 });
    await importCsv(db, c.crewId, c.lead.id, `${HEADER}\nSW-2,2026-03-01,31,65,5,3\n`, 'second.csv');
    // A second run on the same day sees the new item but may not reuse the day's key: it waits for the next day.
    expect(await sendDailyDigests(db, { now: new Date('2030-01-02T18:00:00Z') })).toEqual({ queued: 0, deferred: 1 });
    expect(await sendDailyDigests(db, { now: new Date('2030-01-03T06:30:00Z') })).toEqual({ queued: 1, deferred: 0 });
    const keys = await db
      .selectFrom('mail_outbox')
      .select('idempotency_key')
      .where('kind', '=', 'alert_digest')
      .orderBy('idempotency_key')
      .execute();
    expect(keys.map((k) => k.idempotency_key)).toEqual([
      `digest:${c.rider.id}:2030-01-02`,
      `digest:${c.rider.id}:2030-01-03`,
    ]);
    expect(
      await db
        .selectFrom('mail_outbox')
        .select('id')
        .where('to_address', '=', c.rider.email)
        .where('kind', '=', 'alert_digest')
        .execute(),
    ).toHaveLength(2);
  });
});
