import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { handleUpload } from '~/lib/lab-import/lab-import.routes';

/** POST a lab file (multipart field "file"): kept with its hash, answered with its preview address. */
export const POST: APIRoute = ({ request, locals }) => handleUpload(getDb(), { request, locals });
