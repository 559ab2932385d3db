import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { loadAlertEnv } from '~/lib/alerts/alerts.service';
import { applyUnsubscribe } from '~/lib/alerts/unsubscribe.service';
import { readBodyText, jsonError, jsonOk } from '~/lib/http/json';

// RFC 8058 one-click unsubscribe: the mail's List-Unsubscribe header points here and the mail client POSTs
// "List-Unsubscribe=One-Click". The token in the address is the proof; no session, no cookies. A GET (a
// client that opens the header's address in a browser, or a link scanner) changes nothing: it is sent to
// the page that asks first.

/** One-click unsubscribe. */
export const POST: APIRoute = async ({ request, url }) => {
  // The body says nothing we need beyond RFC 8058's marker; it is read with a cap and otherwise ignored.
  const body = await readBodyText(request, 4 * 1024);
  if (!body.ok) return jsonError(413, 'body_too_large', 'The request body is too large.');
  const result = await applyUnsubscribe(getDb(), url.searchParams.get('token') ?? '', loadAlertEnv().secret);
  if (!result.ok) return jsonError(400, 'invalid_token', 'This unsubscribe link is not valid.');
  return jsonOk({ unsubscribed: result.what });
};

/** Sends a browser to the page that shows what the link stops and asks before doing it. */
export const GET: APIRoute = ({ url }) =>
  new Response(null, {
    status: 303,
    headers: { location: `/unsubscribe?token=${encodeURIComponent(url.searchParams.get('token') ?? '')}` },
  });
