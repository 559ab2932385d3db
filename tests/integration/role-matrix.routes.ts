// The role matrix: for every route under src/pages, what each kind of visitor gets. One row per request;
// a route may have several rows (methods, or a record of the crew and of no crew). tests/integration/
// role-matrix.test.ts fails when a route file has no row here; tests/e2e/role-matrix.test.ts sends every
// row's request to the built server as each visitor and compares statuses.
//
// Adding a route? Append rows. `path` builds the concrete URL for a record of crew A (the visitors' crew;
// the other lead is in crew B), creating the record with ctx.db if it needs one. Pages answer 303 to the
// sign-in page for anonymous visitors; JSON endpoints answer 401. A record of another crew answers 404.
import { randomUUID } from 'node:crypto';
import { sql, type Kysely } from 'kysely';
import type { Database } from '~/lib/db/database';
import { generateToken, hashToken } from '~/lib/auth/tokens';
import { makeMachine } from './factories';

export type Visitor = 'anonymous' | 'rider' | 'mechanic' | 'lead' | 'otherLead';
export const VISITORS: readonly Visitor[] = ['anonymous', 'rider', 'mechanic', 'lead', 'otherLead'];

export interface MatrixContext {
  db: Kysely<Database>;
  crewA: { id: string; leadId: string; mechanicId: string; riderId: string };
  crewB: { id: string; leadId: string };
}

export interface MatrixRow {
  /** The route as derived from its file: src/pages/crews/[id].astro → '/crews/[id]'. */
  route: string;
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  /** The URL to request (a record of crew A unless said otherwise). Called once per visitor. */
  path: string | ((ctx: MatrixContext, visitor: Visitor) => string | Promise<string>);
  /** A JSON body, or an urlencoded form body (sent with this server's Origin unless `origin` says otherwise). */
  json?: unknown;
  /** A form body, or a function building one from the matrix's crews (for fields that name a record). */
  form?: Record<string, string> | ((ctx: MatrixContext) => Record<string, string>);
  origin?: string;
  /** Sign in afresh for this request (for requests that end the session). */
  freshSession?: boolean;
  expect: Record<Visitor, number>;
  note?: string;
}

const all = (status: number): Record<Visitor, number> => ({
  anonymous: status,
  rider: status,
  mechanic: status,
  lead: status,
  otherLead: status,
});
/** A page every member reads; anonymous visitors are sent to sign in; other crews get 404. */
const memberPage = { anonymous: 303, rider: 200, mechanic: 200, lead: 200, otherLead: 404 };
/** A page of one's own account (no crew record in the URL). */
const signedInPage = { anonymous: 303, rider: 200, mechanic: 200, lead: 200, otherLead: 200 };

async function riderMachine(ctx: MatrixContext): Promise<string> {
  const m = await makeMachine(ctx.db, ctx.crewA.id, ctx.crewA.riderId, { name: 'Matrix 450' } as never);
  return m.id;
}

/** Pages and endpoints of a machine's own records: its rider and the lead; mechanics read only. */
const ownerPage = { anonymous: 303, rider: 200, mechanic: 403, lead: 200, otherLead: 404 };
const memberApi = { anonymous: 401, rider: 200, mechanic: 200, lead: 200, otherLead: 404 };
const ownerApi = (ok: number): Record<Visitor, number> => ({
  anonymous: 401,
  rider: ok,
  mechanic: 403,
  lead: ok,
  otherLead: 404,
});

async function riderSample(ctx: MatrixContext): Promise<string> {
  const machineId = await riderMachine(ctx);
  const code = `MX${randomUUID().slice(0, 8).toUpperCase()}`;
  const s = await ctx.db
    .insertInto('samples')
    .values({
      crew_id: ctx.crewA.id,
      machine_id: machineId,
      bottle_code: code,
      bottle_code_norm: code,
      drawn_on: '2025-01-01',
      odometer: 100,
      created_by: ctx.crewA.riderId,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return s.id;
}

/** A sample of crew A's rider machine whose lab results are in, so a reviewer has a call to decide. */
async function resultsSample(ctx: MatrixContext): Promise<string> {
  const id = await riderSample(ctx);
  await ctx.db.updateTable('samples').set({ state: 'results_in' }).where('id', '=', id).execute();
  return id;
}

async function riderWearPart(ctx: MatrixContext): Promise<string> {
  const machineId = await riderMachine(ctx);
  const p = await ctx.db
    .insertInto('wear_parts')
    .values({
      crew_id: ctx.crewA.id,
      machine_id: machineId,
      name: 'Matrix plates',
      new_min_mm: 2.9,
      new_max_mm: 3.1,
      service_limit_mm: 2.6,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return `/machines/${machineId}/wear-parts/${p.id}`;
}

/**
 * A data-sheet new-oil reference of crew A, of a product of its own (each call a new one); with a name, the
 * crew's earlier reference of that name goes first, so a request that saves under that name meets no clash.
 */
async function crewOilReference(ctx: MatrixContext, name = `Matrix oil ${randomUUID().slice(0, 8)}`): Promise<string> {
  await ctx.db
    .deleteFrom('new_oil_references')
    .where('crew_id', '=', ctx.crewA.id)
    .where('product_key', '=', name.toLowerCase())
    .execute();
  const r = await ctx.db
    .insertInto('new_oil_references')
    .values({
      crew_id: ctx.crewA.id,
      product_name: name,
      product_key: name.toLowerCase(),
      source: 'data-sheet',
      readings: JSON.stringify({ KV100: { value: 14 } }),
      bottle_code: null,
      bottle_code_norm: null,
      lab_import_id: null,
      results_on: null,
      created_by: ctx.crewA.leadId,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return r.id;
}

/** A photo of crew A with its bytes in the e2e server's object store (tests/e2e/helpers/server.ts starts it). */
async function crewPhoto(ctx: MatrixContext): Promise<string> {
  const { createHash } = await import('node:crypto');
  const { readConfig } = await import('~/lib/config');
  const { createPhotoStore } = await import('~/lib/photos/photo-stores');
  const { photoKey } = await import('~/lib/photos/photo-store');
  const { bodyOf } = await import('~/lib/photos/photos.storage');
  const bytes = Buffer.from(
    '89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d4944415478da63f8cfc0f01f0005000200ff5f1b5c0000000049454e44ae426082',
    'hex',
  );
  const sha = createHash('sha256').update(bytes).digest('hex');
  const store = createPhotoStore(readConfig({ PHOTO_STORE: 's3', S3_ENDPOINT: process.env.MATRIX_S3_ENDPOINT }));
  await store.put(photoKey(sha), bodyOf(bytes), bytes.length, 'image/png');
  const p = await ctx.db
    .insertInto('photos')
    .values({
      crew_id: ctx.crewA.id,
      sha256: sha,
      content_type: 'image/png',
      byte_size: bytes.length,
      created_by: ctx.crewA.riderId,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return p.id;
}

async function openInvitation(ctx: MatrixContext): Promise<string> {
  const token = generateToken();
  await ctx.db
    .insertInto('crew_invitations')
    .values({
      crew_id: ctx.crewA.id,
      email: 'matrix-invitee@crew-a.example',
      role: 'rider',
      token_hash: hashToken(token),
      invited_by: ctx.crewA.leadId,
      expires_at: new Date(Date.now() + 86_400_000),
    })
    .execute();
  return token;
}

async function throwawayMember(ctx: MatrixContext): Promise<string> {
  const id = `matrix-tmp-${randomUUID().slice(0, 8)}`;
  await ctx.db
    .insertInto('users')
    .values({ id, email: `${id}@crew-a.example`, display_name: 'Temp', password_hash: 'x' })
    .execute();
  await ctx.db.insertInto('crew_members').values({ crew_id: ctx.crewA.id, user_id: id, role: 'rider' }).execute();
  return id;
}

/** A lab file of crew A whose only bottle is one no crew registered (so a confirm writes nothing). */
async function crewLabFile(ctx: MatrixContext): Promise<string> {
  const { createHash } = await import('node:crypto');
  const content = Buffer.from(`Bottle,Fe\nMX-${randomUUID().slice(0, 8)},3\n`);
  const f = await ctx.db
    .insertInto('lab_files')
    .values({
      crew_id: ctx.crewA.id,
      sha256: createHash('sha256').update(content).digest('hex'),
      file_name: 'matrix.csv',
      byte_size: content.length,
      content,
      uploaded_by: ctx.crewA.leadId,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return f.id;
}

/** Lab import pages: leads and mechanics; riders are refused; another crew's file answers 404. */
const importerPage = { anonymous: 303, rider: 403, mechanic: 200, lead: 200, otherLead: 404 };

async function devMail(ctx: MatrixContext): Promise<string> {
  const { rows } = await sql<{ id: number }>`
    insert into dev_mailbox (envelope_to, subject, text_body, raw) values ('matrix@crew-a.example', 'Matrix', 'body', 'raw') returning id`.execute(
    ctx.db,
  );
  return String(rows[0]!.id);
}

export const ROLE_MATRIX: MatrixRow[] = [
  // Public pages and the health check.
  { route: '/', method: 'GET', path: '/', expect: all(200) },
  { route: '/api/health', method: 'GET', path: '/api/health', expect: all(200) },
  { route: '/sign-in', method: 'GET', path: '/sign-in', expect: all(200) },
  { route: '/sign-up', method: 'GET', path: '/sign-up', expect: all(200) },
  { route: '/forgot-password', method: 'GET', path: '/forgot-password', expect: all(200) },
  {
    route: '/reset-password',
    method: 'GET',
    path: '/reset-password?token=not-a-real-token',
    expect: all(400),
    note: 'an invalid link says so',
  },
  { route: '/verify-email', method: 'GET', path: '/verify-email', expect: all(200) },
  { route: '/verify-email', method: 'GET', path: '/verify-email?token=not-a-real-token', expect: all(400) },
  {
    route: '/invitations/[token]',
    method: 'GET',
    path: (ctx) => openInvitation(ctx).then((t) => `/invitations/${t}`),
    expect: all(200),
    note: 'the link itself is the credential',
  },
  { route: '/invitations/[token]', method: 'GET', path: '/invitations/no-such-invitation', expect: all(404) },
  { route: '/sign-out', method: 'GET', path: '/sign-out', expect: { ...signedInPage, anonymous: 303 } },
  { route: '/sign-out', method: 'POST', path: '/sign-out', form: {}, freshSession: true, expect: all(303) },

  // Own account and crews.
  { route: '/account', method: 'GET', path: '/account', expect: signedInPage },
  { route: '/crews', method: 'GET', path: '/crews', expect: signedInPage },
  { route: '/crews/[id]', method: 'GET', path: (ctx) => `/crews/${ctx.crewA.id}`, expect: memberPage },
  {
    route: '/crews/[id]',
    method: 'GET',
    path: `/crews/${'0'.repeat(8)}-0000-4000-8000-${'0'.repeat(12)}`,
    expect: { ...all(404), anonymous: 303 },
    note: 'no such crew looks like another crew',
  },
  {
    route: '/crews/[id]',
    method: 'POST',
    path: (ctx) => `/crews/${ctx.crewA.id}`,
    form: { action: 'invite', email: 'matrix-form@crew-a.example', role: 'mechanic' },
    expect: { anonymous: 303, rider: 403, mechanic: 403, lead: 200, otherLead: 404 },
  },
  {
    route: '/crews/[id]',
    method: 'POST',
    path: (ctx) => `/crews/${ctx.crewA.id}`,
    form: { action: 'invite', email: 'x@crew-a.example', role: 'lead' },
    origin: 'https://attacker.example',
    expect: all(403),
    note: 'cross-site form post: Astro origin check',
  },
  {
    route: '/crews/[id]/limits',
    method: 'GET',
    path: (ctx) => `/crews/${ctx.crewA.id}/limits`,
    expect: { anonymous: 303, rider: 403, mechanic: 403, lead: 200, otherLead: 404 },
  },
  {
    route: '/crews/[id]/limits',
    method: 'GET',
    path: `/crews/${'0'.repeat(8)}-0000-4000-8000-${'0'.repeat(12)}/limits`,
    expect: { ...all(404), anonymous: 303 },
    note: 'no such crew looks like another crew',
  },
  {
    route: '/crews/[id]/limits',
    method: 'POST',
    path: (ctx) => `/crews/${ctx.crewA.id}/limits`,
    form: { Fe: '100' },
    expect: { anonymous: 303, rider: 403, mechanic: 403, lead: 303, otherLead: 404 },
    note: 'the default typed in: nothing changes, back to the page',
  },
  {
    route: '/crews/[id]/limits',
    method: 'POST',
    path: (ctx) => `/crews/${ctx.crewA.id}/limits`,
    form: { Fe: 'lots' },
    expect: { anonymous: 303, rider: 403, mechanic: 403, lead: 400, otherLead: 404 },
    note: 'not a number: refused, nothing written',
  },
  {
    route: '/crews/[id]/limits',
    method: 'POST',
    path: (ctx) => `/crews/${ctx.crewA.id}/limits`,
    form: { Fe: '90' },
    origin: 'https://attacker.example',
    expect: all(403),
    note: 'cross-site form post: Astro origin check',
  },

  // JSON: accounts.
  { route: '/api/auth/me', method: 'GET', path: '/api/auth/me', expect: { ...all(200), anonymous: 401 } },
  {
    route: '/api/auth/sign-in',
    method: 'POST',
    path: '/api/auth/sign-in',
    json: { email: 'not-an-address' },
    expect: all(400),
  },
  {
    route: '/api/auth/sign-up',
    method: 'POST',
    path: '/api/auth/sign-up',
    json: { email: 'x@crew-a.example', password: 'short' },
    expect: all(400),
  },
  {
    route: '/api/auth/sign-out',
    method: 'POST',
    path: '/api/auth/sign-out',
    json: {},
    freshSession: true,
    expect: { ...all(204), anonymous: 401 },
  },

  // JSON: crews.
  { route: '/api/crews', method: 'GET', path: '/api/crews', expect: { ...all(200), anonymous: 401 } },
  {
    route: '/api/crews',
    method: 'POST',
    path: '/api/crews',
    json: { name: '' },
    expect: { ...all(400), anonymous: 401 },
  },
  {
    route: '/api/crews/switch',
    method: 'POST',
    path: '/api/crews/switch',
    json: {},
    freshSession: true,
    expect: { ...all(400), anonymous: 401 },
  },
  {
    route: '/api/crews/switch',
    method: 'POST',
    path: '/api/crews/switch',
    freshSession: true,
    json: 'crewA',
    expect: { anonymous: 401, rider: 200, mechanic: 200, lead: 200, otherLead: 404 },
    note: 'json "crewA" is replaced by { crewId: crew A }',
  },
  {
    route: '/api/crews/switch',
    method: 'POST',
    path: '/api/crews/switch',
    form: { crewId: '', next: '/machines' },
    freshSession: true,
    expect: { ...all(400), anonymous: 303 },
    note: 'the header’s switcher form: signed out goes to sign in',
  },
  {
    route: '/api/crews/[id]/invitations',
    method: 'POST',
    path: (ctx) => `/api/crews/${ctx.crewA.id}/invitations`,
    json: { email: 'matrix-json@crew-a.example', role: 'rider' },
    expect: { anonymous: 401, rider: 403, mechanic: 403, lead: 201, otherLead: 404 },
  },
  {
    route: '/api/crews/[id]/invitations',
    method: 'POST',
    path: (ctx) => `/api/crews/${ctx.crewA.id}/invitations`,
    json: { email: 'matrix-json@crew-a.example', role: 'rider', crewId: 'forged' },
    expect: { anonymous: 401, rider: 400, mechanic: 400, lead: 400, otherLead: 404 },
    note: 'a forged extra field is refused',
  },
  {
    route: '/api/crews/[id]/members/[userId]',
    method: 'PATCH',
    path: (ctx) => `/api/crews/${ctx.crewA.id}/members/${ctx.crewA.riderId}`,
    json: { role: 'rider' },
    expect: { anonymous: 401, rider: 403, mechanic: 403, lead: 204, otherLead: 404 },
  },
  {
    route: '/api/crews/[id]/members/[userId]',
    method: 'DELETE',
    path: async (ctx) => `/api/crews/${ctx.crewA.id}/members/${await throwawayMember(ctx)}`,
    expect: { anonymous: 401, rider: 403, mechanic: 403, lead: 204, otherLead: 404 },
  },

  // The local relay's mailbox (mail helper): served only with DEV_MAILBOX=1, as in development and e2e.
  { route: '/dev/mailbox', method: 'GET', path: '/dev/mailbox', expect: all(200), note: 'DEV_MAILBOX=1 only' },
  {
    route: '/dev/mailbox/[id]',
    method: 'GET',
    path: async (ctx) => `/dev/mailbox/${await devMail(ctx)}`,
    expect: all(200),
    note: 'DEV_MAILBOX=1 only',
  },

  // Machines (machines helper): a machine of crew A owned by its rider.
  { route: '/machines', method: 'GET', path: '/machines', expect: signedInPage },
  {
    route: '/machines/new',
    method: 'GET',
    path: '/machines/new',
    expect: { anonymous: 303, rider: 200, mechanic: 403, lead: 200, otherLead: 200 },
  },
  {
    route: '/machines/[id]',
    method: 'GET',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}`,
    expect: memberPage,
  },
  {
    route: '/machines/[id]/edit',
    method: 'GET',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/edit`,
    expect: { anonymous: 303, rider: 200, mechanic: 403, lead: 200, otherLead: 404 },
  },
  {
    route: '/machines/[id]/oil-change',
    method: 'GET',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/oil-change`,
    expect: { anonymous: 303, rider: 200, mechanic: 403, lead: 200, otherLead: 404 },
  },
  // Rider side (machines helper): drain cards, samples, wear parts, photos and their JSON endpoints.
  {
    route: '/machines/[id]/drain-card',
    method: 'GET',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/drain-card`,
    expect: ownerPage,
  },
  {
    route: '/machines/[id]/drain-card',
    method: 'POST',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/drain-card`,
    form: { bottleCode: '', drawnOn: '2025-01-01', odometer: '10' },
    expect: { anonymous: 303, rider: 400, mechanic: 403, lead: 400, otherLead: 404 },
    note: 'a card with no bottle code',
  },
  {
    route: '/machines/[id]/wear-parts/new',
    method: 'GET',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/wear-parts/new`,
    expect: ownerPage,
  },
  {
    route: '/machines/[id]/wear-parts/[partId]',
    method: 'GET',
    path: async (ctx) => riderWearPart(ctx),
    expect: memberPage,
  },
  { route: '/samples', method: 'GET', path: '/samples', expect: signedInPage },
  {
    route: '/samples/[id]',
    method: 'GET',
    path: async (ctx) => `/samples/${await riderSample(ctx)}`,
    expect: memberPage,
  },
  {
    route: '/samples/[id]',
    method: 'POST',
    path: async (ctx) => `/samples/${await riderSample(ctx)}`,
    form: { trackingNote: 'matrix' },
    expect: { anonymous: 303, rider: 303, mechanic: 403, lead: 303, otherLead: 404 },
    note: 'mark shipped',
  },
  {
    route: '/samples/[id]/tag',
    method: 'GET',
    path: async (ctx) => `/samples/${await riderSample(ctx)}/tag`,
    expect: memberPage,
  },
  { route: '/api/machines', method: 'GET', path: '/api/machines', expect: { ...all(200), anonymous: 401 } },
  {
    route: '/api/machines',
    method: 'POST',
    path: '/api/machines',
    json: { name: 'Matrix API', engineLayout: 'single', cooling: 'air', meter: 'km' },
    expect: { anonymous: 401, rider: 201, mechanic: 403, lead: 201, otherLead: 201 },
  },
  {
    route: '/api/machines/[id]',
    method: 'GET',
    path: async (ctx) => `/api/machines/${await riderMachine(ctx)}`,
    expect: memberApi,
  },
  {
    route: '/api/machines/[id]',
    method: 'PUT',
    path: async (ctx) => `/api/machines/${await riderMachine(ctx)}`,
    json: { name: 'Matrix renamed', engineLayout: 'single', cooling: 'air', meter: 'km' },
    expect: ownerApi(200),
  },
  {
    route: '/api/machines/[id]',
    method: 'PATCH',
    path: async (ctx) => `/api/machines/${await riderMachine(ctx)}`,
    json: { archived: true },
    expect: ownerApi(200),
  },
  {
    route: '/api/machines/[id]',
    method: 'DELETE',
    path: async (ctx) => `/api/machines/${await riderMachine(ctx)}`,
    expect: ownerApi(200),
    note: 'a machine with no records',
  },
  {
    route: '/api/machines/[id]/oil-changes',
    method: 'GET',
    path: async (ctx) => `/api/machines/${await riderMachine(ctx)}/oil-changes`,
    expect: memberApi,
  },
  {
    route: '/api/machines/[id]/oil-changes',
    method: 'POST',
    path: async (ctx) => `/api/machines/${await riderMachine(ctx)}/oil-changes`,
    json: { changedOn: '2025-01-01', odometer: 1200, saeGrade: '10W-40' },
    expect: ownerApi(201),
  },
  { route: '/api/samples', method: 'GET', path: '/api/samples', expect: { ...all(200), anonymous: 401 } },
  {
    route: '/api/samples',
    method: 'POST',
    path: '/api/samples',
    json: {
      machineId: `${'0'.repeat(8)}-0000-4000-8000-${'0'.repeat(12)}`,
      bottleCode: 'MX1',
      drawnOn: '2025-01-01',
      odometer: 5,
    },
    expect: { ...all(404), anonymous: 401 },
    note: 'a machine of no crew',
  },
  {
    route: '/api/samples',
    method: 'POST',
    path: '/api/samples',
    json: 'riderMachineSample',
    expect: { anonymous: 401, rider: 201, mechanic: 403, lead: 201, otherLead: 404 },
    note: 'a drain card for crew A’s rider machine',
  },
  {
    route: '/api/samples/bottle-codes',
    method: 'POST',
    path: '/api/samples/bottle-codes',
    json: {},
    expect: { anonymous: 401, rider: 201, mechanic: 403, lead: 201, otherLead: 201 },
  },
  {
    route: '/api/samples/reserved-codes',
    method: 'POST',
    path: '/api/samples/reserved-codes',
    json: { deviceKey: 'matrix-device-01' },
    expect: { anonymous: 401, rider: 200, mechanic: 403, lead: 200, otherLead: 200 },
    note: 'each visitor reserves in their own crew',
  },
  {
    route: '/api/wear-parts/[partId]/measurements',
    method: 'POST',
    path: async (ctx) => `/api/wear-parts/${(await riderWearPart(ctx)).split('/').at(-1)}/measurements`,
    json: { measuredOn: '2025-01-01', odometer: 100, unit: 'mm', summary: 3 },
    expect: ownerApi(201),
  },
  { route: '/api/offline/pages', method: 'GET', path: '/api/offline/pages', expect: { ...all(200), anonymous: 401 } },
  {
    route: '/samples/by-code/[code]',
    method: 'GET',
    path: async (ctx) => {
      const id = await riderSample(ctx);
      const s = await ctx.db
        .selectFrom('samples')
        .select('bottle_code_norm')
        .where('id', '=', id)
        .executeTakeFirstOrThrow();
      return `/samples/by-code/${s.bottle_code_norm}`;
    },
    expect: { anonymous: 303, rider: 303, mechanic: 303, lead: 303, otherLead: 404 },
    note: 'a tag made offline opens the crew’s sample of that code',
  },
  {
    route: '/outbox',
    method: 'GET',
    path: '/outbox',
    expect: all(200),
    note: 'the list lives on the device; the page shows nothing of the server',
  },
  {
    route: '/api/samples/[id]',
    method: 'GET',
    path: async (ctx) => `/api/samples/${await riderSample(ctx)}`,
    expect: memberApi,
  },
  {
    route: '/api/samples/[id]/ship',
    method: 'POST',
    path: async (ctx) => `/api/samples/${await riderSample(ctx)}/ship`,
    json: { trackingNote: 'matrix' },
    expect: ownerApi(200),
  },
  {
    route: '/api/photos',
    method: 'POST',
    path: '/api/photos',
    form: { file: 'not multipart' },
    expect: { ...all(415), anonymous: 401 },
    note: 'a photo must come as multipart',
  },
  {
    route: '/api/photos/[id]',
    method: 'GET',
    path: async (ctx) => `/api/photos/${await crewPhoto(ctx)}`,
    expect: memberApi,
  },
  {
    route: '/api/trends/[machineId]',
    method: 'GET',
    path: async (ctx) => `/api/trends/${await riderMachine(ctx)}?measurands=Fe`,
    expect: { anonymous: 401, rider: 200, mechanic: 200, lead: 200, otherLead: 404 },
  },

  // Machine and wear-part forms (machines helper): the POST side of the pages above. Invalid input
  // answers 400 on the page, so a status tells a refusal from an accepted form without writing anything.
  {
    route: '/machines/new',
    method: 'POST',
    path: '/machines/new',
    form: { name: '' },
    expect: { anonymous: 303, rider: 400, mechanic: 403, lead: 400, otherLead: 400 },
    note: 'a machine with no name',
  },
  {
    route: '/machines/[id]/edit',
    method: 'POST',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/edit`,
    form: { action: 'archive' },
    expect: { anonymous: 303, rider: 303, mechanic: 403, lead: 303, otherLead: 404 },
    note: 'archive',
  },
  {
    route: '/machines/[id]/oil-change',
    method: 'POST',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/oil-change`,
    form: { changedOn: '', odometer: '' },
    expect: { anonymous: 303, rider: 400, mechanic: 403, lead: 400, otherLead: 404 },
    note: 'an oil change with no date',
  },
  {
    route: '/machines/[id]/wear-parts/new',
    method: 'POST',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/wear-parts/new`,
    form: { name: '' },
    expect: { anonymous: 303, rider: 400, mechanic: 403, lead: 400, otherLead: 404 },
    note: 'a wear part with no name',
  },
  {
    route: '/machines/[id]/wear-parts/[partId]',
    method: 'POST',
    path: async (ctx) => riderWearPart(ctx),
    form: { measuredOn: '2025-01-01', odometer: '100' },
    expect: { anonymous: 303, rider: 400, mechanic: 403, lead: 400, otherLead: 404 },
    note: 'a measurement with no value',
  },
  {
    route: '/machines/[id]/history',
    method: 'GET',
    path: async (ctx) => `/machines/${await riderMachine(ctx)}/history`,
    expect: memberPage,
  },
  {
    route: '/machines/[id]/history',
    method: 'GET',
    path: '/machines/not-a-machine/history',
    expect: { ...all(404), anonymous: 303 },
  },

  // New-oil references: every member of the crew records and edits them; another crew's answers 404.
  {
    route: '/oil-references',
    method: 'GET',
    path: '/oil-references',
    expect: signedInPage,
    note: 'each visitor sees their own crew',
  },
  {
    route: '/oil-references/new',
    method: 'GET',
    path: '/oil-references/new?source=lab&product=Matrix',
    expect: signedInPage,
  },
  {
    route: '/oil-references/new',
    method: 'POST',
    path: '/oil-references/new',
    form: { source: 'data-sheet', productName: '' },
    expect: { anonymous: 303, rider: 400, mechanic: 400, lead: 400, otherLead: 400 },
    note: 'a reference with no product',
  },
  {
    route: '/oil-references/[id]',
    method: 'GET',
    path: async (ctx) => `/oil-references/${await crewOilReference(ctx)}`,
    expect: memberPage,
  },
  {
    route: '/oil-references/[id]',
    method: 'GET',
    path: '/oil-references/not-a-reference',
    expect: { ...all(404), anonymous: 303 },
  },
  {
    route: '/oil-references/[id]',
    method: 'POST',
    path: async (ctx) => `/oil-references/${await crewOilReference(ctx)}`,
    form: { productName: 'Matrix', KV100: '1' },
    expect: { anonymous: 303, rider: 400, mechanic: 400, lead: 400, otherLead: 404 },
    note: 'a KV100 below 2 mm²/s',
  },
  {
    route: '/oil-references/[id]',
    method: 'POST',
    path: async (ctx) => `/oil-references/${await crewOilReference(ctx)}`,
    form: { action: 'delete' },
    expect: { anonymous: 303, rider: 303, mechanic: 303, lead: 303, otherLead: 404 },
    note: 'delete',
  },
  { route: '/api/oil-references', method: 'GET', path: '/api/oil-references', expect: { ...all(200), anonymous: 401 } },
  {
    route: '/api/oil-references',
    method: 'POST',
    path: '/api/oil-references',
    json: { source: 'data-sheet', productName: 'Matrix', KV100: 14, KV40: 9 },
    expect: { ...all(400), anonymous: 401 },
    note: 'swapped viscosities',
  },
  {
    route: '/api/oil-references/[id]',
    method: 'GET',
    path: async (ctx) => `/api/oil-references/${await crewOilReference(ctx)}`,
    expect: memberApi,
  },
  {
    route: '/api/oil-references/[id]',
    method: 'PUT',
    path: async (ctx) => `/api/oil-references/${await crewOilReference(ctx, 'Matrix put target')}`,
    json: { productName: 'Matrix put target', KV100: 14.5 },
    expect: memberApi,
  },
  {
    route: '/api/oil-references/[id]',
    method: 'DELETE',
    path: async (ctx) => `/api/oil-references/${await crewOilReference(ctx)}`,
    expect: memberApi,
  },

  // Reading side: overview, rules, oil tools, trends and the readings export.
  {
    route: '/overview',
    method: 'GET',
    path: '/overview',
    expect: signedInPage,
    note: 'each visitor sees their own crew',
  },
  { route: '/rules', method: 'GET', path: '/rules', expect: all(200), note: 'how findings are made is public' },
  {
    route: '/tools',
    method: 'GET',
    path: '/tools?tool=vi&kv40=100&kv100=11',
    expect: all(200),
    note: 'the calculators need no account',
  },
  {
    route: '/tools',
    method: 'GET',
    path: async (ctx) => `/tools?tool=suits&machine=${await riderMachine(ctx)}&grade=10W-40&low=0&high=30`,
    expect: all(200),
    note: 'another crew’s machine is simply not offered',
  },
  {
    route: '/api/exports/readings.csv',
    method: 'GET',
    path: '/api/exports/readings.csv',
    expect: { ...all(200), anonymous: 401 },
    note: 'the own crew’s readings',
  },
  {
    route: '/api/exports/readings.csv',
    method: 'GET',
    path: async (ctx) => `/api/exports/readings.csv?machine=${await riderMachine(ctx)}`,
    expect: memberApi,
  },

  // Reviews: leads and mechanics write notes and decide calls, as JSON or as the sample page's
  // plain forms. A signed-out browser's form goes to sign in; a JSON call gets 401.
  {
    route: '/api/reviews/[sampleId]/notes',
    method: 'POST',
    path: async (ctx) => `/api/reviews/${await riderSample(ctx)}/notes`,
    json: { body: 'Matrix note' },
    expect: { anonymous: 401, rider: 403, mechanic: 201, lead: 201, otherLead: 404 },
  },
  {
    route: '/api/reviews/[sampleId]/notes',
    method: 'POST',
    path: async (ctx) => `/api/reviews/${await riderSample(ctx)}/notes`,
    form: { body: 'Matrix note' },
    expect: { anonymous: 303, rider: 403, mechanic: 303, lead: 303, otherLead: 404 },
    note: 'the sample page’s form',
  },
  {
    route: '/api/reviews/[sampleId]/call',
    method: 'POST',
    path: async (ctx) => `/api/reviews/${await resultsSample(ctx)}/call`,
    json: { action: 'override', call: 'hold', note: 'Matrix override' },
    expect: { anonymous: 401, rider: 403, mechanic: 201, lead: 201, otherLead: 404 },
  },
  {
    route: '/api/reviews/[sampleId]/call',
    method: 'POST',
    path: async (ctx) => `/api/reviews/${await riderSample(ctx)}/call`,
    json: { action: 'confirm' },
    expect: { anonymous: 401, rider: 403, mechanic: 409, lead: 409, otherLead: 404 },
    note: 'no results yet, so no call',
  },
  {
    route: '/api/reviews/[sampleId]/call',
    method: 'POST',
    path: async (ctx) => `/api/reviews/${await resultsSample(ctx)}/call`,
    form: { action: 'override', call: 'shorten', note: 'Matrix override' },
    expect: { anonymous: 303, rider: 403, mechanic: 303, lead: 303, otherLead: 404 },
    note: 'the sample page’s form',
  },
  // Baseline choices: leads and mechanics take a sample out of its machine's baseline or put it back, with a reason.
  {
    route: '/api/reviews/[sampleId]/baseline',
    method: 'POST',
    path: async (ctx) => `/api/reviews/${await resultsSample(ctx)}/baseline`,
    json: { action: 'exclude', reason: 'Matrix: bottle drawn after a top-up' },
    expect: { anonymous: 401, rider: 403, mechanic: 201, lead: 201, otherLead: 404 },
  },
  {
    route: '/api/reviews/[sampleId]/baseline',
    method: 'POST',
    path: async (ctx) => `/api/reviews/${await resultsSample(ctx)}/baseline`,
    form: { action: 'include', reason: 'Matrix: the draw was fine after all' },
    expect: { anonymous: 303, rider: 403, mechanic: 303, lead: 303, otherLead: 404 },
    note: 'the sample page’s form',
  },

  // The review queue's one-step confirmation of steady calls (each crew confirms its own), and its undo.
  {
    route: '/api/reviews/steady-calls',
    method: 'POST',
    path: '/api/reviews/steady-calls',
    json: {},
    expect: { anonymous: 401, rider: 403, mechanic: 201, lead: 201, otherLead: 201 },
    note: 'another crew’s lead confirms their own crew’s queue',
  },
  {
    route: '/api/reviews/steady-calls',
    method: 'POST',
    path: '/api/reviews/steady-calls',
    form: { confirm: 'steady' },
    expect: { anonymous: 303, rider: 403, mechanic: 303, lead: 303, otherLead: 303 },
    note: 'the home page’s form',
  },
  {
    route: '/api/reviews/steady-calls/undo',
    method: 'POST',
    path: '/api/reviews/steady-calls/undo',
    json: { callIds: [randomUUID()] },
    expect: { anonymous: 401, rider: 403, mechanic: 404, lead: 404, otherLead: 404 },
    note: 'no such confirmation of theirs',
  },
  {
    route: '/api/reviews/steady-calls/undo',
    method: 'POST',
    path: '/api/reviews/steady-calls/undo',
    form: { callIds: 'x'.repeat(100_000) },
    expect: { anonymous: 303, rider: 413, mechanic: 413, lead: 413, otherLead: 413 },
    note: 'a 100 KB field is refused before it is read',
  },

  // The not-found page itself (rendered for unknown addresses and for other crews' records).
  { route: '/404', method: 'GET', path: '/404', expect: all(404) },
  {
    route: '/forbidden',
    method: 'GET',
    path: '/forbidden?reason=add-machine',
    expect: all(403),
    note: 'the 403 page pages rewrite to',
  },

  // Alerts and reminders: preferences of one's own account; the unsubscribe page and one-click
  // endpoint work without a session (the signed token is the proof), so every visitor gets the same answer.
  { route: '/account/notifications', method: 'GET', path: '/account/notifications', expect: signedInPage },
  {
    route: '/account/notifications',
    method: 'POST',
    path: '/account/notifications',
    form: { action: 'save' },
    expect: all(303),
    note: 'anonymous to sign in; members back to the page, saved',
  },
  {
    route: '/account/notifications',
    method: 'POST',
    path: '/account/notifications',
    form: (ctx) => ({ action: 'save', [`pref.${ctx.crewA.id}.sample_due`]: 'digest' }),
    expect: { ...all(303), otherLead: 404 },
    note: 'a choice for crew A: its members save it; crew B’s lead is not in it',
  },
  {
    route: '/unsubscribe',
    method: 'GET',
    path: '/unsubscribe?token=not-a-real-token',
    expect: all(400),
    note: 'an invalid link says so',
  },
  {
    route: '/unsubscribe',
    method: 'POST',
    path: '/unsubscribe',
    form: { token: 'not-a-real-token' },
    expect: all(400),
  },
  {
    route: '/api/unsubscribe',
    method: 'POST',
    path: '/api/unsubscribe?token=not-a-real-token',
    form: { 'List-Unsubscribe': 'One-Click' },
    expect: all(400),
  },
  {
    route: '/api/unsubscribe',
    method: 'GET',
    path: '/api/unsubscribe?token=x',
    expect: all(303),
    note: 'a GET only leads to the page that asks',
  },

  // Lab import: leads and mechanics upload, preview and confirm; the crew is always the session's.
  {
    route: '/imports',
    method: 'GET',
    path: '/imports',
    expect: signedInPage,
    note: 'a rider sees why they cannot import',
  },
  {
    route: '/imports/[id]',
    method: 'GET',
    path: async (ctx) => `/imports/${await crewLabFile(ctx)}`,
    expect: importerPage,
  },
  {
    route: '/imports/[id]',
    method: 'POST',
    path: async (ctx) => `/imports/${await crewLabFile(ctx)}`,
    form: { action: 'check' },
    expect: importerPage,
  },
  {
    route: '/api/imports',
    method: 'POST',
    path: '/api/imports',
    form: { file: 'not multipart' },
    expect: { anonymous: 401, rider: 403, mechanic: 415, lead: 415, otherLead: 415 },
    note: 'a lab file must come as multipart',
  },
  {
    route: '/api/imports/[id]/confirm',
    method: 'POST',
    path: async (ctx) => `/api/imports/${await crewLabFile(ctx)}/confirm`,
    json: { decisions: {} },
    expect: { anonymous: 401, rider: 403, mechanic: 422, lead: 422, otherLead: 404 },
    note: 'its only bottle is unknown, so nothing is written',
  },

  // Lab reports by e-mail: the lead replaces the crew's import address (each lead acts on their own crew);
  // the inbound webhook exists only when INBOUND_MAIL_SECRET is set, and is authenticated by its signature.
  {
    route: '/api/import-address',
    method: 'POST',
    path: '/api/import-address',
    form: { action: 'rotate' },
    expect: { anonymous: 401, rider: 403, mechanic: 403, lead: 200, otherLead: 200 },
    note: "the session's crew, never one named in the form",
  },
  {
    route: '/api/inbound-mail',
    method: 'POST',
    path: '/api/inbound-mail',
    json: { raw: 'not a message' },
    expect: all(404),
    note: 'no INBOUND_MAIL_SECRET in the test server; signed requests are tested in tests/integration/lab-mail',
  },
];
