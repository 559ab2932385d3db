// Lab reports by e-mail against the real database and a real SMTP session with the local relay: raw MIME in,
// pending lab files (or a logged reason) out. Nothing is written to samples: only a confirm does that.
import nodemailer from 'nodemailer';
import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import { startMailRelay, type RunningMailRelay } from '~/lib/mail/relay';
import { changeSender, processInboundMails } from '~/lib/lab-mail/lab-mail.service';
import { MAX_INBOUND_MAIL_BYTES } from '~/lib/lab-mail/lab-mail';
import { openTestDb, truncateAll } from '../test-database';
import {
  composeMail,
  countLabFiles,
  DOMAIN,
  env,
  LAB_CSV,
  LAB_SENDER,
  makeLabWorkbook,
  makeMailCrew,
} from './lab-mail-fixtures';

const db = openTestDb();
let relay: RunningMailRelay;
const silent = () => {};

beforeAll(async () => {
  relay = await startMailRelay({ db, port: 0, inboundDomain: DOMAIN, log: silent });
});
afterAll(async () => {
  await relay.close();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

/** Deliver a raw message to the relay as a lab's mail server would; resolves to the relay's answer. */
async function deliver(
  raw: Buffer,
  to: string,
  from = LAB_SENDER,
): Promise<{ ok: true; response: string } | { ok: false; code: number | undefined; message: string }> {
  const transport = nodemailer.createTransport({ host: '127.0.0.1', port: relay.port, secure: false, ignoreTLS: true });
  try {
    const info = await transport.sendMail({ envelope: { from, to: [to] }, raw });
    return { ok: true, response: info.response };
  } catch (error) {
    const e = error as { responseCode?: number; message: string };
    return { ok: false, code: e.responseCode, message: e.message };
  } finally {
    transport.close();
  }
}

async function inbound() {
  return db.selectFrom('inbound_mails').selectAll().orderBy('received_at').execute();
}

describe('lab mail through the local relay', () => {
  test('a message with a CSV and an .xlsx attachment becomes two pending lab files of the right crew', async () => {
    const { crew, lead, mechanic, address } = await makeMailCrew(db);
    const other = await makeMailCrew(db, 'Other crew');
    const raw = await composeMail({
      to: address,
      attachments: [
        { filename: 'results.csv', content: LAB_CSV, contentType: 'text/csv' },
        {
          filename: 'results.xlsx',
          content: await makeLabWorkbook(),
          contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
        },
        { filename: 'letter.pdf', content: Buffer.from('%PDF-1.4 not a lab file'), contentType: 'application/pdf' },
      ],
    });
    const answer = await deliver(raw, address);
    expect(answer).toMatchObject({ ok: true });
    // Stored raw on receipt, before anything is read.
    const [stored] = await inbound();
    expect(stored).toMatchObject({ status: 'received', crew_id: crew.id, via: 'smtp' });
    expect(stored?.raw?.equals(raw)).toBe(true);

    const report = await processInboundMails(db, { env });
    expect(report).toEqual({ processed: 1, setAside: 0, filesStored: 2 });
    const files = await db.selectFrom('lab_files').selectAll().orderBy('file_name').execute();
    expect(files.map((f) => [f.crew_id, f.file_name, f.uploaded_by, f.inbound_mail_id])).toEqual([
      [crew.id, 'results.csv', null, stored?.id],
      [crew.id, 'results.xlsx', null, stored?.id],
    ]);
    expect(await countLabFiles(db, other.crew.id)).toBe(0);
    // Pending: nothing confirmed, nothing written to samples.
    expect(await db.selectFrom('lab_imports').selectAll().execute()).toEqual([]);
    expect(await db.selectFrom('readings').selectAll().execute()).toEqual([]);
    const [processed] = await inbound();
    expect(processed).toMatchObject({ status: 'processed', from_address: LAB_SENDER, reason: null });
    expect([...(processed?.lab_file_ids ?? [])].sort()).toEqual(files.map((f) => f.id).sort());

    // The lead and the mechanic each get one notice with a link to each preview.
    const outbox = await db.selectFrom('mail_outbox').selectAll().orderBy('to_address').execute();
    expect(outbox.map((m) => m.to_address).sort()).toEqual([lead.email, mechanic.email].sort());
    for (const m of outbox) {
      expect(m.kind).toBe('alert_lab_report_arrived');
      for (const f of files) expect(m.text_body).toContain(`https://sumpwise.test/imports/${f.id}`);
    }
  });

  test('the same message again writes nothing new', async () => {
    const { crew, address } = await makeMailCrew(db);
    const raw = await composeMail({ to: address, attachments: [{ filename: 'results.csv', content: LAB_CSV }] });
    expect(await deliver(raw, address)).toMatchObject({ ok: true });
    await processInboundMails(db, { env });
    const again = await deliver(raw, address);
    expect(again.ok && again.response).toContain('already received');
    expect(await processInboundMails(db, { env })).toEqual({ processed: 0, setAside: 0, filesStored: 0 });
    // Resent with another Message-ID: a new message, but the same file is not stored or announced twice.
    const resent = await composeMail({
      to: address,
      messageId: '<fixed-2@hollow-creek.example>',
      attachments: [{ filename: 'results.csv', content: LAB_CSV }],
    });
    expect(await deliver(resent, address)).toMatchObject({ ok: true });
    expect(await processInboundMails(db, { env })).toEqual({ processed: 1, setAside: 0, filesStored: 0 });
    expect(await countLabFiles(db, crew.id)).toBe(1);
    expect((await inbound()).map((m) => m.status)).toEqual(['processed', 'processed']);
    expect((await inbound())[1]?.reason).toContain('nothing new was stored');
    expect(await db.selectFrom('mail_outbox').selectAll().execute()).toHaveLength(2);
  });

  test('an unknown token is refused at once, with its reason logged', async () => {
    await makeMailCrew(db);
    const to = `lab-${'q'.repeat(26)}@${DOMAIN}`;
    const answer = await deliver(await composeMail({ to, attachments: [{ filename: 'r.csv', content: LAB_CSV }] }), to);
    expect(answer).toMatchObject({ ok: false, code: 550 });
    const [row] = await inbound();
    expect(row).toMatchObject({ status: 'refused', crew_id: null, raw: null, recipient: to });
    expect(row?.reason).toContain('No crew has the import address');
  });

  test('a sender off the allow-list is kept aside with a sentence and never imported', async () => {
    const { crew, lead, address } = await makeMailCrew(db);
    await changeSender(db, { crewId: crew.id, userId: lead.id, ip: null, sender: LAB_SENDER, add: true });
    const raw = await composeMail({
      from: 'someone@elsewhere.example',
      to: address,
      attachments: [{ filename: 'r.csv', content: LAB_CSV }],
    });
    expect(await deliver(raw, address, 'someone@elsewhere.example')).toMatchObject({ ok: true });
    expect(await processInboundMails(db, { env })).toEqual({ processed: 0, setAside: 1, filesStored: 0 });
    const [row] = await inbound();
    expect(row?.status).toBe('set_aside');
    expect(row?.reason).toContain("someone@elsewhere.example, which is not on the crew's list of lab addresses");
    expect(await countLabFiles(db, crew.id)).toBe(0);
    expect(await db.selectFrom('mail_outbox').selectAll().execute()).toEqual([]);
    // The listed sender still gets through.
    const good = await composeMail({
      to: address,
      messageId: '<ok@x>',
      attachments: [{ filename: 'r.csv', content: LAB_CSV }],
    });
    await deliver(good, address);
    expect(await processInboundMails(db, { env })).toEqual({ processed: 1, setAside: 0, filesStored: 1 });
  });

  test('a 30 MB message is refused with its reason logged', async () => {
    const { crew, address } = await makeMailCrew(db);
    const big = Buffer.alloc(30 * 1000 * 1000, 'a');
    const raw = await composeMail({ to: address, attachments: [{ filename: 'huge.csv', content: big }] });
    expect(raw.byteLength).toBeGreaterThan(MAX_INBOUND_MAIL_BYTES);
    const answer = await deliver(raw, address);
    expect(answer).toMatchObject({ ok: false, code: 552 });
    const [row] = await inbound();
    expect(row).toMatchObject({ status: 'refused', crew_id: crew.id, raw: null });
    expect(row?.reason).toMatch(/^The message is \d+\.\d MiB; messages up to 25 MiB are accepted/);
    expect(await countLabFiles(db, crew.id)).toBe(0);
  }, 60_000);

  test.each([
    ['no header block', Buffer.from('just some bytes without any header\x00\x01')],
    [
      'a multipart type without a boundary',
      Buffer.from('From: results@hollow-creek.example\r\nContent-Type: multipart/mixed\r\n\r\n--x\r\nbody\r\n'),
    ],
    ['a header line that is not a header', Buffer.from('From: a@b.example\r\nthis is not a header\r\n\r\nbody')],
  ])('malformed MIME (%s) is kept aside with its reason', async (_what, raw) => {
    const { crew, address } = await makeMailCrew(db);
    expect(await deliver(raw, address)).toMatchObject({ ok: true });
    expect(await processInboundMails(db, { env })).toEqual({ processed: 0, setAside: 1, filesStored: 0 });
    const [row] = await inbound();
    expect(row?.status).toBe('set_aside');
    expect(row?.reason).toMatch(
      /^The message could not be read as e-mail \(.+\), so it was kept aside and nothing was imported\.$/,
    );
    expect(await countLabFiles(db, crew.id)).toBe(0);
  });

  test('a message without a lab attachment is kept aside, naming what it had', async () => {
    const { crew, address } = await makeMailCrew(db);
    const raw = await composeMail({
      to: address,
      attachments: [
        { filename: 'photo.jpg', content: Buffer.from([0xff, 0xd8, 0xff, 0xe0]), contentType: 'image/jpeg' },
      ],
    });
    await deliver(raw, address);
    await processInboundMails(db, { env });
    const [row] = await inbound();
    expect(row?.status).toBe('set_aside');
    expect(row?.reason).toBe(
      'The message has no CSV, TSV, text or .xlsx attachment (only "photo.jpg"), so there was nothing to import; it was kept aside.',
    );
    expect(await countLabFiles(db, crew.id)).toBe(0);
  });

  test('an attachment that fails the upload checks is refused like an upload, with its words', async () => {
    const { crew, address } = await makeMailCrew(db);
    const raw = await composeMail({
      to: address,
      attachments: [
        { filename: 'results.csv', content: Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 1, 2]) },
      ],
    });
    await deliver(raw, address);
    await processInboundMails(db, { env });
    const [row] = await inbound();
    expect(row?.status).toBe('set_aside');
    expect(row?.reason).toContain('"results.csv": This file is a PNG image, not a CSV text file.');
    expect(await countLabFiles(db, crew.id)).toBe(0);
  });
});
