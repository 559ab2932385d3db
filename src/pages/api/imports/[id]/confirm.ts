import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { handleConfirmJson } from '~/lib/lab-import/lab-import.routes';

/** POST the row decisions as JSON: writes the whole file in one transaction, or nothing. */
export const POST: APIRoute = ({ request, locals, params }) =>
  handleConfirmJson(getDb(), { request, locals }, params.id ?? '');
