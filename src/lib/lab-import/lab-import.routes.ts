/**
 * The request side of the lab import, kept out of the route files so tests can call it with a real
 * database and a plain Request: read and size-check the body, check the session and permission, call one
 * service function, and answer JSON (scripts, the Uppy island) or a redirect (plain HTML forms).
 */
import type { Kysely } from 'kysely';
import { canImportLabReport } from '../auth/permissions';
import type { CrewMembership, SessionUser } from '../auth/types';
import type { Database } from '../db/database';
import { wantsPage } from '../http/form';
import { jsonError, jsonOk, readBodyBytes } from '../http/json';
import { refuse, succeed, type Result } from '../http/result';
import { notFoundPage } from '../http/not-found';
import { MAX_LAB_FILE_BYTES, type LabCsvMappingTarget } from '../lab-csv/lab-csv';
import {
  confirmInputSchema,
  MAPPING_TARGETS,
  profileInputSchema,
  rowDecisionSchema,
  type RowDecision,
} from './lab-import';
import { confirmLabImport, saveLabProfile, storeLabFile } from './lab-import.service';

export interface RouteContext {
  request: Request;
  locals: { user: SessionUser | null; crew: CrewMembership | null };
}

/** Room for the multipart envelope around a file of the largest accepted size. */
const MULTIPART_OVERHEAD_BYTES = 64 * 1024;
/** A body past this is not read any further; up to it, it is drained so the browser gets the answer. */
const DRAIN_LIMIT_BYTES = 64 * 1024 * 1024;

function redirect(location: string): Response {
  return new Response(null, { status: 303, headers: { location } });
}

type Gate = { ok: true; user: SessionUser; crew: CrewMembership } | { ok: false; response: Response };

function checkImporter(ctx: RouteContext, html: boolean, next: string): Gate {
  const { user, crew } = ctx.locals;
  if (!user || !crew) {
    return {
      ok: false,
      response: html
        ? redirect(`/sign-in?next=${encodeURIComponent(next)}`)
        : jsonError(401, 'unauthorised', 'Sign in to import lab reports.'),
    };
  }
  if (!canImportLabReport(crew)) {
    return {
      ok: false,
      response: jsonError(403, 'forbidden', "Only the crew's lead or a mechanic imports lab reports."),
    };
  }
  return { ok: true, user, crew };
}

/** Keys a request may never carry: the crew is the session's, whatever the body says. */
const FORGED_KEYS = ['crewId', 'crew_id', 'crew', 'userId', 'user_id'];

/** POST /api/imports: a multipart upload with one file in field "file". */
export async function handleUpload(db: Kysely<Database>, ctx: RouteContext): Promise<Response> {
  const html = wantsPage(ctx.request);
  const gate = checkImporter(ctx, html, '/imports');
  if (!gate.ok) return gate.response;
  const fail = (status: number, code: string, message: string, extra = ''): Response =>
    html ? redirect(`/imports?error=${encodeURIComponent(code)}${extra}`) : jsonError(status, code, message);

  const type = ctx.request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type)) {
    return fail(415, 'unsupported_media_type', 'Send the lab file as multipart/form-data in the field "file".');
  }
  const body = await readBodyBytes(ctx.request, MAX_LAB_FILE_BYTES + MULTIPART_OVERHEAD_BYTES, DRAIN_LIMIT_BYTES);
  if (!body.ok) {
    return fail(
      413,
      'file_too_large',
      `The upload is ${(body.size / (1024 * 1024)).toFixed(1)} MiB; lab files up to 5 MiB are accepted. Split the report into smaller files.`,
    );
  }
  let form: FormData;
  try {
    form = await new Request('http://local/', {
      method: 'POST',
      headers: { 'content-type': type },
      body: Buffer.from(body.bytes.buffer, body.bytes.byteOffset, body.bytes.byteLength) as unknown as BodyInit,
    }).formData();
  } catch {
    return fail(400, 'invalid_upload', 'The upload could not be read as a form; choose the file again.');
  }
  const forged = FORGED_KEYS.find((k) => form.has(k));
  if (forged) {
    return html
      ? fail(400, 'forged_field', '')
      : jsonError(400, 'invalid_input', 'The crew comes from your session; it cannot be chosen in the request.', {
          [forged]: 'is not accepted here',
        });
  }
  const file = form.get('file');
  if (!(file instanceof File) || (file.size === 0 && file.name === '')) {
    return fail(400, 'no_file', 'Choose a lab file (CSV, TSV or text) to upload.');
  }
  const stored = await storeLabFile(db, {
    crewId: gate.crew.crewId,
    userId: gate.user.id,
    fileName: file.name,
    bytes: new Uint8Array(await file.arrayBuffer()),
  });
  if (!stored.ok) {
    const fileId = stored.fields?.labFileId;
    if (!html) return jsonError(stored.status, stored.code, stored.message, stored.fields);
    return fail(stored.status, stored.code, stored.message, fileId ? `&file=${encodeURIComponent(fileId)}` : '');
  }
  const previewUrl = `/imports/${stored.value.labFileId}`;
  if (html) return redirect(previewUrl);
  return jsonOk(
    { labFileId: stored.value.labFileId, status: stored.value.status, previewUrl },
    stored.value.status === 'stored' ? 201 : 200,
  );
}

/** Decisions from form fields "row.<line>"; a field that does not parse is reported by its line. */
export function readDecisionFields(form: URLSearchParams): {
  decisions: Record<string, RowDecision>;
  fields: Record<string, string>;
} {
  const decisions: Record<string, RowDecision> = {};
  const fields: Record<string, string> = {};
  for (const [key, value] of form) {
    const m = /^row\.(\d{1,7})$/.exec(key);
    if (!m || value === '') continue;
    const parsed = rowDecisionSchema.safeParse(value);
    if (parsed.success) decisions[m[1]!] = parsed.data;
    else fields[key] = `Line ${m[1]}: ${parsed.error.issues[0]?.message ?? 'choose what to do with this row'}.`;
  }
  return { decisions, fields };
}

/** Column targets from form fields "col.<index>", only values from the known list. */
export function readColumnFields(form: URLSearchParams): Record<number, LabCsvMappingTarget> {
  const targets: Record<number, LabCsvMappingTarget> = {};
  for (const [key, value] of form) {
    const m = /^col\.(\d{1,4})$/.exec(key);
    if (m && (MAPPING_TARGETS as readonly string[]).includes(value))
      targets[Number(m[1])] = value as LabCsvMappingTarget;
  }
  return targets;
}

/** POST /api/imports/:id/confirm as JSON: `{ "decisions": { "12": "skip", "13": "create:<machine id>" } }`. */
export async function handleConfirmJson(db: Kysely<Database>, ctx: RouteContext, labFileId: string): Promise<Response> {
  const gate = checkImporter(ctx, false, `/imports/${labFileId}`);
  if (!gate.ok) return gate.response;
  const type = ctx.request.headers.get('content-type') ?? '';
  if (!/^application\/json\b/i.test(type))
    return jsonError(415, 'unsupported_media_type', 'Send the decisions as application/json.');
  const body = await readBodyBytes(ctx.request, 1024 * 1024, DRAIN_LIMIT_BYTES);
  if (!body.ok) return jsonError(413, 'payload_too_large', 'The request body is larger than 1 MiB.');
  let raw: unknown;
  try {
    raw = JSON.parse(Buffer.from(body.bytes).toString('utf8') || '{}');
  } catch {
    return jsonError(400, 'invalid_json', 'The request body is not valid JSON.');
  }
  const parsed = confirmInputSchema.safeParse(raw);
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const issue of parsed.error.issues) {
      if (issue.code === 'unrecognized_keys')
        for (const k of issue.keys)
          fields[k] = FORGED_KEYS.includes(k)
            ? 'is not accepted here: the crew comes from your session'
            : 'is not accepted here';
      else fields[issue.path.join('.') || '_'] ??= issue.message;
    }
    return jsonError(400, 'invalid_input', 'Some fields need attention.', fields);
  }
  const result = await confirmLabImport(db, {
    crewId: gate.crew.crewId,
    userId: gate.user.id,
    labFileId,
    decisions: parsed.data.decisions,
  });
  if (!result.ok) return jsonError(result.status, result.code, result.message, result.fields);
  return jsonOk(result.value, 201);
}

/**
 * The outcome of a preview page post. `result` is ok with the answer to send (a redirect, the not-found page),
 * ok with null to show the page again (a "check"), or a refusal (status 422) whose message and fields go beside
 * the rows. `decisions` and `profileName` are what was posted, to show the form as it was sent.
 */
export interface PreviewPost {
  result: Result<Response | null>;
  decisions: Record<string, RowDecision>;
  profileName?: string;
}

/** A refusal the page shows beside its rows: always 422, the status the page answers a post that wrote nothing with. */
const refusePost = (code: string, message: string, fields: Record<string, string> = {}) =>
  refuse(422, code, message, fields);

/**
 * The preview page's own form posts (works without JavaScript): "check" re-reads the decisions, "confirm"
 * writes, "save-profile" stores the column mapping. The crew is the session's; a crew field is refused.
 */
export async function handlePreviewPost(
  db: Kysely<Database>,
  ctx: RouteContext,
  labFileId: string,
  form: URLSearchParams,
): Promise<PreviewPost> {
  const gate = checkImporter(ctx, true, `/imports/${labFileId}`);
  if (!gate.ok) return { result: succeed(gate.response), decisions: {} };
  const forged = FORGED_KEYS.find((k) => form.has(k));
  if (forged)
    return {
      result: refusePost(
        'crew_from_session',
        'The crew comes from your session and cannot be chosen in the form; nothing was written.',
      ),
      decisions: {},
    };
  const action = form.get('action') ?? 'check';
  if (action === 'save-profile') {
    const profileName = form.get('profileName') ?? '';
    const input = profileInputSchema.safeParse({ name: profileName, mapping: {} });
    if (!input.success) {
      return {
        result: refusePost('invalid_input', 'The lab profile needs attention.', {
          profileName: input.error.issues[0]?.message ?? 'Give the lab profile a name',
        }),
        decisions: {},
        profileName,
      };
    }
    const saved = await saveLabProfile(db, {
      crewId: gate.crew.crewId,
      userId: gate.user.id,
      labFileId,
      name: input.data.name,
      targets: readColumnFields(form),
    });
    if (!saved.ok) {
      if (saved.status === 404) return { result: succeed(notFoundPage()), decisions: {} };
      return {
        result: refusePost(saved.code, saved.message, saved.fields),
        decisions: {},
        profileName: input.data.name,
      };
    }
    return { result: succeed(redirect(`/imports/${labFileId}?profile=saved`)), decisions: {} };
  }
  const { decisions, fields } = readDecisionFields(form);
  if (Object.keys(fields).length > 0)
    return { result: refusePost('invalid_input', 'Some rows need attention.', fields), decisions };
  if (action !== 'confirm') return { result: succeed(null), decisions };
  const result = await confirmLabImport(db, { crewId: gate.crew.crewId, userId: gate.user.id, labFileId, decisions });
  if (result.ok) return { result: succeed(redirect(`/imports/${labFileId}?done=1`)), decisions };
  if (result.status === 404) return { result: succeed(notFoundPage()), decisions };
  return { result: refusePost(result.code, result.message, result.fields), decisions };
}
