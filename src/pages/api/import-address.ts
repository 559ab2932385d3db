import type { APIRoute } from 'astro';
import { clientIp } from '~/lib/auth/deps';
import { getConfig } from '~/lib/config';
import { getDb } from '~/lib/db';
import { handleImportAddressPost } from '~/lib/lab-mail/lab-mail.routes';

/** POST (form) action=rotate | add-sender | remove-sender (+ sender): the crew's import address card. */
export const POST: APIRoute = (context) =>
  handleImportAddressPost(getDb(), {
    request: context.request,
    locals: context.locals,
    ip: clientIp(context),
    config: getConfig(),
  });
