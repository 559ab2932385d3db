// The import address card's endpoint and the inbound webhook, called with plain Requests against the real
// database: who may do what, forged and oversized input, and the webhook's signature.
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { CrewMembership, SessionUser } from '~/lib/auth/types';
import type { Role } from '~/lib/db/database';
import { signInboundWebhook, WEBHOOK_HEADERS } from '~/lib/lab-mail/lab-mail';
import { handleImportAddressPost, handleInboundWebhook } from '~/lib/lab-mail/lab-mail.routes';
import { getImportAddress } from '~/lib/lab-mail/lab-mail.service';
import { openTestDb, truncateAll } from '../test-database';
import { composeMail, DOMAIN, LAB_CSV, makeMailCrew } from './lab-mail-fixtures';

const db = openTestDb();
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

const SECRET = 'webhook-test-secret-0123456789abcdef';
const config = { INBOUND_MAIL_DOMAIN: DOMAIN, INBOUND_MAIL_SECRET: SECRET };
const NOW = 1_790_000_000;

function locals(userId: string, crewId: string, role: Role) {
  const user: SessionUser = {
    id: userId,
    email: 'x@example.test',
    displayName: 'X',
    emailVerified: true,
    distanceUnit: 'km',
    lengthUnit: 'mm',
    temperatureUnit: 'C',
  };
  const crew: CrewMembership = { crewId, crewName: 'Mail crew', role };
  return { user, crew };
}

function formRequest(body: string, html = false): Request {
  return new Request('http://127.0.0.1/api/import-address', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', accept: html ? 'text/html' : 'application/json' },
    body,
  });
}

describe('POST /api/import-address', () => {
  test('the lead replaces the address: the old one stops working, and the audit log says who did it', async () => {
    const { crew, lead } = await makeMailCrew(db);
    const before = await getImportAddress(db, crew.id, DOMAIN);
    const res = await handleImportAddressPost(db, {
      request: formRequest('action=rotate'),
      locals: locals(lead.id, crew.id, 'lead'),
      ip: '192.0.2.7',
      config,
    });
    expect(res.status).toBe(200);
    const after = await getImportAddress(db, crew.id, DOMAIN);
    expect(after.address).not.toBe(before.address);
    expect(after.address).toMatch(/^lab-[a-z2-7]{26}@import\.sumpwise\.test$/);
    const events = await db.selectFrom('audit_events').select(['kind', 'actor_user_id', 'crew_id', 'ip']).execute();
    expect(events).toEqual([
      { kind: 'import_address_rotated', actor_user_id: lead.id, crew_id: crew.id, ip: '192.0.2.7' },
    ]);
  });

  test.each([
    ['mechanic', 403],
    ['rider', 403],
  ] as const)('a %s cannot change it (%i)', async (role, status) => {
    const { crew, mechanic } = await makeMailCrew(db);
    const before = await getImportAddress(db, crew.id, DOMAIN);
    const res = await handleImportAddressPost(db, {
      request: formRequest('action=rotate'),
      locals: locals(mechanic.id, crew.id, role),
      ip: null,
      config,
    });
    expect(res.status).toBe(status);
    expect((await getImportAddress(db, crew.id, DOMAIN)).address).toBe(before.address);
  });

  test('signed out: 401 for scripts, sign-in for a browser form', async () => {
    const json = await handleImportAddressPost(db, {
      request: formRequest('action=rotate'),
      locals: { user: null, crew: null },
      ip: null,
      config,
    });
    expect(json.status).toBe(401);
    const html = await handleImportAddressPost(db, {
      request: formRequest('action=rotate', true),
      locals: { user: null, crew: null },
      ip: null,
      config,
    });
    expect(html.status).toBe(303);
    expect(html.headers.get('location')).toBe('/sign-in?next=%2Fimports');
  });

  test('adds and removes a lab address, normalised, once', async () => {
    const { crew, lead } = await makeMailCrew(db);
    const ctx = (body: string) => ({
      request: formRequest(body),
      locals: locals(lead.id, crew.id, 'lead'),
      ip: null,
      config,
    });
    expect(
      (await handleImportAddressPost(db, ctx('action=add-sender&sender=%20Results%40Lab.Example%20'))).status,
    ).toBe(200);
    expect((await getImportAddress(db, crew.id, DOMAIN)).senders).toEqual(['results@lab.example']);
    const again = await handleImportAddressPost(db, ctx('action=add-sender&sender=results%40lab.example'));
    expect(again.status).toBe(409);
    expect((await handleImportAddressPost(db, ctx('action=remove-sender&sender=results%40lab.example'))).status).toBe(
      200,
    );
    expect((await getImportAddress(db, crew.id, DOMAIN)).senders).toEqual([]);
    expect((await db.selectFrom('audit_events').select('kind').orderBy('id').execute()).map((e) => e.kind)).toEqual([
      'import_sender_added',
      'import_sender_removed',
    ]);
  });

  test.each([
    ['not an address', 'action=add-sender&sender=nobody', 400],
    ['an unknown action', 'action=delete-everything', 400],
    ['a forged crew id', 'action=rotate&crewId=00000000-0000-0000-0000-000000000000', 400],
    ['a 100 KB address', `action=add-sender&sender=${'a'.repeat(100_000)}%40x.example`, 413],
  ])('refuses %s and writes nothing', async (_what, body, status) => {
    const { crew, lead } = await makeMailCrew(db);
    const before = await getImportAddress(db, crew.id, DOMAIN);
    const res = await handleImportAddressPost(db, {
      request: formRequest(body),
      locals: locals(lead.id, crew.id, 'lead'),
      ip: null,
      config,
    });
    expect(res.status).toBe(status);
    const after = await getImportAddress(db, crew.id, DOMAIN);
    expect(after).toEqual(before);
    expect(await db.selectFrom('audit_events').selectAll().execute()).toEqual([]);
  });
});

async function webhookRequest(
  raw: Buffer,
  recipient: string,
  over: { secret?: string; timestamp?: number; type?: string; signature?: string } = {},
): Promise<Request> {
  const ts = String(over.timestamp ?? NOW);
  return new Request('http://127.0.0.1/api/inbound-mail', {
    method: 'POST',
    headers: {
      'content-type': over.type ?? 'message/rfc822',
      [WEBHOOK_HEADERS.timestamp]: ts,
      [WEBHOOK_HEADERS.recipient]: recipient,
      [WEBHOOK_HEADERS.signature]: over.signature ?? signInboundWebhook(over.secret ?? SECRET, ts, recipient, raw),
    },
    body: raw as unknown as BodyInit,
  });
}

describe('POST /api/inbound-mail (webhook)', () => {
  test('a signed message is stored once for the crew of its address', async () => {
    const { crew, address } = await makeMailCrew(db);
    const raw = await composeMail({ to: address, attachments: [{ filename: 'r.csv', content: LAB_CSV }] });
    const res = await handleInboundWebhook(db, await webhookRequest(raw, address), config, NOW);
    expect(res.status).toBe(202);
    const again = await handleInboundWebhook(db, await webhookRequest(raw, address), config, NOW);
    expect(again.status).toBe(200);
    expect(await again.json()).toEqual({ status: 'duplicate' });
    const rows = await db.selectFrom('inbound_mails').select(['crew_id', 'via', 'status']).execute();
    expect(rows).toEqual([{ crew_id: crew.id, via: 'webhook', status: 'received' }]);
  });

  test.each([
    ['a wrong secret', { secret: 'another-secret-0123456789abcdef0123' }, 401],
    ['a timestamp ten minutes old', { timestamp: NOW - 600 }, 401],
    ['a forged signature header', { signature: 'sha256=00' }, 401],
    ['another content type', { type: 'text/plain' }, 415],
  ])('refuses %s and stores nothing', async (_what, over, status) => {
    const { address } = await makeMailCrew(db);
    const raw = await composeMail({ to: address, attachments: [{ filename: 'r.csv', content: LAB_CSV }] });
    const res = await handleInboundWebhook(db, await webhookRequest(raw, address, over), config, NOW);
    expect(res.status).toBe(status);
    expect(await db.selectFrom('inbound_mails').selectAll().execute()).toEqual([]);
  });

  test('a message for an unknown address is refused (404) and logged', async () => {
    await makeMailCrew(db);
    const to = `lab-${'z'.repeat(26)}@${DOMAIN}`;
    const res = await handleInboundWebhook(
      db,
      await webhookRequest(Buffer.from('From: a@b.example\r\n\r\nx'), to),
      config,
      NOW,
    );
    expect(res.status).toBe(404);
    expect(await db.selectFrom('inbound_mails').select('status').execute()).toEqual([{ status: 'refused' }]);
  });

  test('a body over 25 MiB is refused (413) without being stored', async () => {
    const { address } = await makeMailCrew(db);
    const res = await handleInboundWebhook(
      db,
      await webhookRequest(Buffer.alloc(26 * 1024 * 1024, 'a'), address),
      config,
      NOW,
    );
    expect(res.status).toBe(413);
    expect(await db.selectFrom('inbound_mails').selectAll().execute()).toEqual([]);
  });

  test('a chunked body without a length is read only up to the limit, then refused (413)', async () => {
    const { address } = await makeMailCrew(db);
    let sent = 0;
    const chunk = new Uint8Array(1024 * 1024).fill(0x61);
    const stream = new ReadableStream<Uint8Array>({
      pull(controller) {
        // 40 MiB offered in 1 MiB chunks; the reader must stop long before the end.
        if (sent >= 40) return controller.close();
        sent += 1;
        controller.enqueue(chunk);
      },
    });
    const request = new Request('http://127.0.0.1/api/inbound-mail', {
      method: 'POST',
      headers: {
        'content-type': 'message/rfc822',
        [WEBHOOK_HEADERS.timestamp]: String(NOW),
        [WEBHOOK_HEADERS.recipient]: address,
        [WEBHOOK_HEADERS.signature]: 'sha256=00',
      },
      body: stream,
      duplex: 'half',
    } as RequestInit);
    const res = await handleInboundWebhook(db, request, config, NOW);
    expect(res.status).toBe(413);
    expect(sent).toBeLessThan(40);
    expect(await db.selectFrom('inbound_mails').selectAll().execute()).toEqual([]);
  });

  test('without INBOUND_MAIL_SECRET the endpoint does not exist', async () => {
    const { address } = await makeMailCrew(db);
    const res = await handleInboundWebhook(
      db,
      await webhookRequest(Buffer.from('x'), address),
      { INBOUND_MAIL_DOMAIN: DOMAIN },
      NOW,
    );
    expect(res.status).toBe(404);
  });
});
