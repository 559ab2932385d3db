import type { APIRoute } from 'astro';
import { getConfig } from '~/lib/config';
import { getDb } from '~/lib/db';
import { handleInboundWebhook } from '~/lib/lab-mail/lab-mail.routes';

/** POST a raw message (message/rfc822) from the inbound mail provider, signed with INBOUND_MAIL_SECRET. */
export const POST: APIRoute = ({ request }) => handleInboundWebhook(getDb(), request, getConfig());
