/**
 * The request side of lab reports by mail, kept out of the route files so tests call it with a real
 * database and a plain Request: the import address card's form, and the inbound webhook.
 */
import type { Kysely } from 'kysely';
import { canImportLabReport, canManageImportAddress } from '../auth/permissions';
import type { CrewMembership, SessionUser } from '../auth/types';
import type { AppConfig } from '../config';
import type { Database } from '../db/database';
import { readForm, wantsPage } from '../http/form';
import { fieldErrorsFrom, jsonError, jsonOk, readBodyBytes } from '../http/json';
import { refusalJson } from '../http/responses';
import { checkInboundWebhook, importAddressFormSchema, MAX_INBOUND_MAIL_BYTES, WEBHOOK_HEADERS } from './lab-mail';
import { changeSender, receiveInboundMail, rotateImportAddress } from './lab-mail.service';

export interface AddressRouteContext {
  request: Request;
  locals: { user: SessionUser | null; crew: CrewMembership | null };
  ip: string | null;
  config: Pick<AppConfig, 'INBOUND_MAIL_DOMAIN'>;
}

function back(query: string): Response {
  return new Response(null, { status: 303, headers: { location: `/imports?${query}#import-address` } });
}

/** POST /api/import-address: rotate the address, or add or remove a lab address of the allow-list (leads). */
export async function handleImportAddressPost(db: Kysely<Database>, ctx: AddressRouteContext): Promise<Response> {
  const html = wantsPage(ctx.request);
  const { user, crew } = ctx.locals;
  if (!user || !crew)
    return html
      ? new Response(null, { status: 303, headers: { location: '/sign-in?next=%2Fimports' } })
      : jsonError(401, 'unauthorised', 'Sign in to manage the import address.');
  if (!canManageImportAddress(crew)) {
    return jsonError(
      403,
      'forbidden',
      canImportLabReport(crew)
        ? "Only the crew's lead changes the import address and its lab list."
        : "Only the crew's lead changes the import address.",
    );
  }
  const form = await readForm(ctx.request, 4 * 1024);
  if (!form.ok) return form.response;
  const parsed = importAddressFormSchema.safeParse(Object.fromEntries(form.form));
  if (!parsed.success) {
    const fields = fieldErrorsFrom(parsed.error);
    const message = fields.sender ?? 'Choose an action: replace the address, or add or remove a lab address.';
    return html
      ? back(`address_error=${encodeURIComponent(message)}`)
      : jsonError(400, 'invalid_input', message, fields);
  }
  const input = parsed.data;
  const result =
    input.action === 'rotate'
      ? await rotateImportAddress(db, {
          crewId: crew.crewId,
          userId: user.id,
          ip: ctx.ip,
          domain: ctx.config.INBOUND_MAIL_DOMAIN,
        })
      : await changeSender(db, {
          crewId: crew.crewId,
          userId: user.id,
          ip: ctx.ip,
          sender: input.sender,
          add: input.action === 'add-sender',
        });
  if (!result.ok) return html ? back(`address_error=${encodeURIComponent(result.message)}`) : refusalJson(result);
  return html
    ? back(`address_done=${encodeURIComponent(result.value.message)}`)
    : jsonOk({ message: result.value.message });
}

/**
 * POST /api/inbound-mail: the production hand-off from an inbound mail provider. The body is the raw
 * message (Content-Type message/rfc822, at most 25 MiB); the envelope recipient and an HMAC-SHA256
 * signature travel in headers (see checkInboundWebhook). Without INBOUND_MAIL_SECRET the endpoint does not exist.
 */
export async function handleInboundWebhook(
  db: Kysely<Database>,
  request: Request,
  config: Pick<AppConfig, 'INBOUND_MAIL_DOMAIN' | 'INBOUND_MAIL_SECRET'>,
  nowSeconds = Math.floor(Date.now() / 1000),
): Promise<Response> {
  const secret = config.INBOUND_MAIL_SECRET;
  if (!secret) return jsonError(404, 'not_found', 'No such endpoint.');
  const type = (request.headers.get('content-type') ?? '').split(';')[0]?.trim().toLowerCase();
  if (type !== 'message/rfc822')
    return jsonError(415, 'unsupported_media_type', 'Send the raw message as message/rfc822.');
  const body = await readBodyBytes(request, MAX_INBOUND_MAIL_BYTES, MAX_INBOUND_MAIL_BYTES + 1024 * 1024);
  if (!body.ok)
    return jsonError(
      413,
      'message_too_large',
      `The message is larger than ${MAX_INBOUND_MAIL_BYTES / (1024 * 1024)} MiB and was refused.`,
    );
  const h = (name: string) => request.headers.get(name);
  const problem = checkInboundWebhook(
    secret,
    {
      timestamp: h(WEBHOOK_HEADERS.timestamp),
      recipient: h(WEBHOOK_HEADERS.recipient),
      signature: h(WEBHOOK_HEADERS.signature),
    },
    body.bytes,
    nowSeconds,
  );
  if (problem) return jsonError(401, 'unauthorised', `The request is not signed: ${problem}.`);
  const recipient = (h(WEBHOOK_HEADERS.recipient) ?? '').slice(0, 320);
  const envelopeFrom = h(WEBHOOK_HEADERS.envelopeFrom)?.slice(0, 320) ?? null;
  const outcome = await receiveInboundMail(db, {
    via: 'webhook',
    envelopeFrom,
    recipient,
    raw: Buffer.from(body.bytes),
    domain: config.INBOUND_MAIL_DOMAIN,
  });
  switch (outcome.status) {
    case 'received':
      return jsonOk({ status: 'received', id: outcome.id }, 202);
    case 'duplicate':
      return jsonOk({ status: 'duplicate' }, 200);
    case 'refused':
      return jsonError(
        outcome.smtpCode === 552 ? 413 : 404,
        outcome.smtpCode === 552 ? 'message_too_large' : 'unknown_address',
        outcome.reason,
      );
  }
}
