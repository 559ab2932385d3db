import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { canReadCrew } from '~/lib/auth/permissions';
import { jsonError } from '~/lib/http/json';
import { buildExportFileName, buildReadingsCsv } from '~/lib/exports/readings-csv';
import { listExportReadings } from '~/lib/exports/exports.repository';
import { findCrewMachine } from '~/lib/trends/trends.repository';

/** GET /api/exports/readings.csv[?machine=<id>] — every reading of the crew, or of one machine, as CSV. */
export const GET: APIRoute = async ({ url, locals }) => {
  if (!locals.user) return jsonError(401, 'unauthenticated', 'Sign in to export readings.');
  if (!canReadCrew(locals.crew)) return jsonError(404, 'not_found', 'Nothing to export here.');
  const db = getDb();
  const machineId = url.searchParams.get('machine') ?? undefined;
  let scope = locals.crew.crewName;
  if (machineId) {
    const machine = await findCrewMachine(db, locals.crew.crewId, machineId);
    if (!machine) return jsonError(404, 'not_found', 'No such machine in this crew.');
    scope = machine.name;
  }
  const csv = buildReadingsCsv(await listExportReadings(db, locals.crew.crewId, machineId));
  return new Response(`\ufeff${csv}`, {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="${buildExportFileName(scope, new Date().toISOString().slice(0, 10))}"`,
      'cache-control': 'no-store',
    },
  });
};
