/**
 * Lab import rules: keep the upload, build the preview (profile, matching, decisions), save lab profiles,
 * and confirm: one transaction that writes readings, replaced values, sample states, findings and the
 * engine's interval call, or nothing at all.
 */
import { createHash } from 'node:crypto';
import type { Kysely, Transaction } from 'kysely';
import type { SamplePoint } from '../analysis';
import type { MeasurandCode } from '../analysis/measurands';
import type { Database } from '../db/database';
import { readLabFileBytes } from '../lab-csv/lab-xlsx';
import { MAX_LAB_FILE_BYTES, parseLabCsv, type LabCsvIssue, type LabCsvMappingTarget } from '../lab-csv/lab-csv';
import { checkCrewQuota } from '../storage-quota/storage-quota';
import { sumCrewStorageBytes } from '../storage-quota/storage-quota.repository';
import { CODE_ALPHABET, explainIssuedCode, hasValidCheckSymbol, ISSUED_DATA_LENGTH } from '../samples/bottle-code';
import {
  computeHeaderSignature,
  countLines,
  MAX_LAB_FILE_LINES,
  tooManyLinesMessage,
  findColumnTarget,
  type ConfirmHooks,
  type ImportPreview,
  type ImportSummary,
  type LabFile,
  type LabProfile,
  type PreviewRow,
  type RowDecision,
  type RowMatch,
} from './lab-import';
import * as repo from './lab-import.repository';
import { refuse, succeed, type Refusal, type Result } from '../http/result';
import { isUuid } from '../ids';
import { formatDay, formatMomentDay } from '../words/dates';
import { queueImportAlerts } from '../alerts/alerts.service';
import { recomputeChangedSamples } from '../findings/findings.service';
import { recordSampleStates } from '../samples/sample-lifecycle';
import {
  findNewOilBottles,
  findNewOilCodesWrittenBy,
  splitNewOilRows,
  writeNewOilResults,
} from '../new-oil/new-oil.service';

type Db = Kysely<Database> | Transaction<Database>;

/** A file name safe to show and store: the last path segment, printable, at most 200 characters. */
export function cleanFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? '';
  // eslint-disable-next-line no-control-regex
  const printable = base.replace(/[\u0000-\u001f\u007f]/g, '').trim();
  return (printable || 'lab-report.csv').slice(0, 200);
}

/** Hex SHA-256 of the bytes: the identity of an upload within a crew. */
export function computeFileHash(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export interface StoredLabFile {
  labFileId: string;
  /** 'stored' for a new file; 'already-uploaded' when the crew uploaded the same bytes and has not confirmed them yet. */
  status: 'stored' | 'already-uploaded';
}

/**
 * Keep an uploaded lab file (bytes, SHA-256, uploader, crew, time) after checking its size and content
 * (CSV, TSV, text or an .xlsx workbook, judged by content). A file that came by mail has no uploader but its
 * message. The same bytes again write nothing: an imported file is refused as already imported, a pending one is reused.
 */
export async function storeLabFile(
  db: Db,
  input: {
    crewId: string;
    userId: string | null;
    fileName: string;
    bytes: Uint8Array;
    inboundMailId?: string;
    quotaBytes?: number;
  },
): Promise<Result<StoredLabFile>> {
  if (input.bytes.byteLength > MAX_LAB_FILE_BYTES) {
    const mib = (input.bytes.byteLength / (1024 * 1024)).toFixed(1);
    return refuse(
      413,
      'file_too_large',
      `"${cleanFileName(input.fileName)}" is ${mib} MiB; lab files up to 5 MiB are accepted. Split the report into smaller files.`,
    );
  }
  const decoded = await readLabFileBytes(input.bytes);
  if ('error' in decoded) {
    const status = decoded.error.code === 'empty-file' ? 400 : 415;
    return refuse(
      status,
      decoded.error.code.replace(/-/g, '_'),
      `"${cleanFileName(input.fileName)}": ${decoded.error.message}`,
    );
  }
  const lines = countLines(decoded.text);
  if (lines > MAX_LAB_FILE_LINES)
    return refuse(413, 'too_many_lines', tooManyLinesMessage(cleanFileName(input.fileName), lines));
  const sha256 = computeFileHash(input.bytes);
  const existing = await repo.findLabFileByHash(db, input.crewId, sha256);
  if (existing) return answerExisting(existing);
  const overQuota = checkCrewQuota(
    await sumCrewStorageBytes(db, input.crewId),
    input.bytes.byteLength,
    input.quotaBytes,
  );
  if (overQuota) return refuse(413, 'quota_exceeded', overQuota);
  const inserted = await repo.insertLabFile(db, {
    crewId: input.crewId,
    sha256,
    fileName: cleanFileName(input.fileName),
    content: Buffer.from(input.bytes),
    uploadedBy: input.userId,
    inboundMailId: input.inboundMailId ?? null,
  });
  if (inserted) return succeed({ labFileId: inserted.id, status: 'stored' });
  // Two uploads of the same bytes at once: the other one won; answer as if it came first.
  const winner = await repo.findLabFileByHash(db, input.crewId, sha256);
  if (!winner) return refuse(409, 'upload_conflict', 'The same file was uploaded twice at once; try again.');
  return answerExisting(winner);
}

function answerExisting(file: {
  id: string;
  file_name: string;
  import_id: string | null;
  confirmed_at: Date | null;
}): Result<StoredLabFile> {
  if (file.import_id) {
    // A refusal knows no reader's zone: the day is the UTC one, and says so.
    const on = file.confirmed_at ? ` on ${formatMomentDay(file.confirmed_at, 'UTC')} (UTC)` : '';
    return refuse(
      409,
      'already_imported',
      `This file was already imported${on} (as "${file.file_name}"); nothing new was written.`,
      { labFileId: file.id },
    );
  }
  return succeed({ labFileId: file.id, status: 'already-uploaded' });
}

function toLabFile(row: NonNullable<Awaited<ReturnType<typeof repo.findLabFileOfCrew>>>): LabFile {
  return {
    id: row.id,
    crewId: row.crew_id,
    sha256: row.sha256,
    fileName: row.file_name,
    byteSize: row.byte_size,
    uploadedBy: row.uploaded_by,
    uploadedAt: row.uploaded_at,
    importId: row.import_id,
    importedAt: row.confirmed_at,
  };
}

/** The crew's recent lab files with their import state, for the lab import page. */
export async function listLabFiles(db: Db, crewId: string) {
  const rows = await repo.listLabFilesOfCrew(db, crewId);
  return rows.map((r) => ({ ...toLabFile(r), samplesWritten: r.samples_written, readingsWritten: r.readings_written }));
}

/** The headers of a file's header row, read from its first lines only (a profile is looked up before the full read). */
function readHeaders(text: string): string[] {
  let end = 0;
  for (let n = 0; n < 40 && end !== -1; n += 1) end = text.indexOf('\n', end + 1);
  const head = end === -1 ? text : text.slice(0, end);
  return parseLabCsv(head).columns.map((c) => c.header);
}

// Kept reachable from the service for its callers; it lives with the feature's pure helpers.
export { findColumnTarget };

function looksIssued(norm: string): boolean {
  return norm.length === ISSUED_DATA_LENGTH + 1 && [...norm].every((ch) => CODE_ALPHABET.includes(ch));
}

function describeDecision(
  match: RowMatch,
  decision: RowDecision | null,
  errors: number,
  machineIds: ReadonlySet<string>,
  bottle: string,
  at: string,
): string | null {
  if (decision?.action === 'skip') return null;
  if (errors > 0)
    return `${at}: fix the ${errors === 1 ? 'error' : `${errors} errors`} in this row in the lab file and upload it again, or skip the row.`;
  switch (match.kind) {
    case 'matched':
      if (decision === null || decision.action === 'write' || decision.action === 'replace') return null;
      return `${at}: bottle "${bottle}" is already registered on ${match.machineName}; write it there or skip the row.`;
    case 'has-results':
      if (decision?.action === 'replace') return null;
      return `${at}: the sample with bottle "${bottle}" (${match.machineName}, ${formatDay(match.drawnOn)}) already has ${match.existing} results. Choose "replace" to write these and keep the old values in its history, or skip the row.`;
    case 'unknown':
      if (decision?.action === 'create') {
        return machineIds.has(decision.machineId)
          ? null
          : `${at}: the machine chosen for bottle "${bottle}" is not one of this crew's machines; pick another or skip the row.`;
      }
      return `${at}: no sample of this crew has bottle code "${bottle}". Create the sample on one of your machines, or skip the row.`;
  }
}

/** Read a crew's stored file with its profile, match every row to the crew's samples, and apply the decisions. */
export async function previewLabImport(
  db: Db,
  input: { crewId: string; labFileId: string; decisions?: Record<string, RowDecision> },
): Promise<Result<ImportPreview>> {
  if (!isUuid(input.labFileId)) return refuse(404, 'not_found', 'No such lab file in this crew.');
  const fileRow = await repo.findLabFileOfCrew(db, input.crewId, input.labFileId);
  if (!fileRow) return refuse(404, 'not_found', 'No such lab file in this crew.');
  const content = await repo.findLabFileContent(db, input.crewId, input.labFileId);
  if (!content) return refuse(404, 'not_found', 'No such lab file in this crew.');
  // A workbook is read on the sheet a profile of the crew names, else on its first sheet with a lab header.
  const sheetNames = await repo.listProfileSheetNames(db, input.crewId);
  const decoded = await readLabFileBytes(new Uint8Array(content.buffer, content.byteOffset, content.byteLength), {
    sheetNames,
  });
  if ('error' in decoded) return refuse(415, decoded.error.code.replace(/-/g, '_'), decoded.error.message);
  // Files stored before the cap existed are held to it too.
  const lines = countLines(decoded.text);
  if (lines > MAX_LAB_FILE_LINES) return refuse(413, 'too_many_lines', tooManyLinesMessage(fileRow.file_name, lines));

  const signature = computeHeaderSignature(readHeaders(decoded.text));
  const profileRow = await repo.findProfileBySignature(db, input.crewId, signature);
  const profile: LabProfile | null = profileRow
    ? {
        id: profileRow.id,
        name: profileRow.name,
        headerSignature: profileRow.header_signature,
        mapping: profileRow.mapping as Record<string, LabCsvMappingTarget>,
        sheetName: profileRow.sheet_name,
      }
    : null;
  const parsed = parseLabCsv(decoded.text, profile ? { mapping: profile.mapping } : {});
  const bottleHeader = parsed.columns.find((c) => c.kind === 'bottle')?.header ?? 'Bottle';

  const norms = parsed.rows.map((r) => r.bottle.normalised);
  const [samples, machines] = await Promise.all([
    repo.findSamplesByCodes(db, input.crewId, [...new Set(norms)]),
    repo.findMachinesForImport(db, input.crewId),
  ]);
  const byCode = new Map(samples.map((s) => [s.bottle_code_norm, s]));
  const newOilBottles = await findNewOilBottles(
    db,
    input.crewId,
    norms.filter((n) => !byCode.has(n)),
  );
  // An imported file is shown as it was written: which rows went in, which were skipped.
  const writtenCodes = fileRow.import_id ? await repo.findCodesWrittenBy(db, fileRow.import_id) : null;
  const machineIds = new Set(machines.map((m) => m.id));

  const rowIssues = new Map<number, LabCsvIssue[]>();
  const rowLines = new Set(parsed.rows.map((r) => r.line));
  const fileIssues: LabCsvIssue[] = [];
  for (const issue of parsed.errors) {
    if (
      issue.row !== null &&
      rowLines.has(issue.row) &&
      issue.code !== 'unknown-column' &&
      issue.code !== 'lines-skipped'
    ) {
      const list = rowIssues.get(issue.row) ?? [];
      list.push(issue);
      rowIssues.set(issue.row, list);
    } else {
      fileIssues.push(issue);
    }
  }

  const allRows: PreviewRow[] = parsed.rows.map((r) => {
    const norm = r.bottle.normalised;
    const issues = rowIssues.get(r.line) ?? [];
    const at = `Line ${r.line}, column "${bottleHeader}"`;
    const sample = byCode.get(norm);
    let match: RowMatch;
    if (sample && sample.issued_code && !hasValidCheckSymbol(norm)) {
      match = { kind: 'unknown', codeProblem: explainIssuedCode(norm) };
    } else if (sample) {
      const base = {
        sampleId: sample.id,
        machineId: sample.machine_id,
        machineName: sample.machine_name,
        drawnOn: sample.drawn_on,
      };
      match =
        (sample.reading_count ?? 0) > 0
          ? { kind: 'has-results', ...base, existing: sample.reading_count ?? 0 }
          : { kind: 'matched', ...base };
    } else {
      match = { kind: 'unknown', codeProblem: looksIssued(norm) ? explainIssuedCode(norm) : null };
    }
    const warnings = issues.filter((x) => x.severity === 'warning');
    if (match.kind === 'unknown' && match.codeProblem) {
      warnings.push({
        severity: 'warning',
        code: 'missing-bottle-code',
        row: r.line,
        column: bottleHeader,
        message: `${at}: "${r.bottle.raw}" looks like a Sumpwise bottle code, but ${match.codeProblem.charAt(0).toLowerCase()}${match.codeProblem.slice(1)}`,
      });
    }
    const errors = issues.filter((x) => x.severity === 'error');
    const chosen = input.decisions?.[String(r.line)] ?? null;
    const decision: RowDecision | null =
      chosen ?? (match.kind === 'matched' && errors.length === 0 ? { action: 'write' } : null);
    return {
      line: r.line,
      bottle: r.bottle.raw,
      bottleNorm: norm,
      sampled: r.sampled ?? null,
      reported: r.reported ?? null,
      readings: r.readings,
      match,
      errors,
      warnings,
      decision,
      needs: writtenCodes ? null : describeDecision(match, decision, errors.length, machineIds, r.bottle.raw, at),
      written: writtenCodes?.has(norm) ?? false,
    };
  });

  const { rows, newOilRows } = splitNewOilRows(
    allRows,
    newOilBottles,
    fileRow.import_id ? await findNewOilCodesWrittenBy(db, fileRow.import_id) : null,
  );
  const blockingFileIssues = fileIssues.filter((x) => x.severity === 'error');
  let ready = 0;
  let skipped = 0;
  let readings = 0;
  for (const row of rows) {
    if (row.decision?.action === 'skip') skipped += 1;
    else if (row.needs === null) {
      ready += 1;
      readings += Object.keys(row.readings).length;
    }
  }
  const blocked = rows.length - ready - skipped + newOilRows.filter((r) => r.errors.length > 0).length;
  return {
    ok: true,
    value: {
      file: toLabFile(fileRow),
      columns: parsed.columns,
      headers: parsed.columns.map((c) => c.header),
      headerSignature: signature,
      sheet: decoded.sheet,
      profile,
      fileIssues,
      rows,
      newOilRows,
      machines,
      counts: { rows: rows.length + newOilRows.length, ready, skipped, blocked, readings },
      canConfirm:
        fileRow.import_id === null && blockingFileIssues.length === 0 && blocked === 0 && ready + newOilRows.length > 0,
    },
  };
}

/** Save the crew's lab profile for a file's header (name + one target per header) and return it. */
export async function saveLabProfile(
  db: Db,
  input: {
    crewId: string;
    userId: string;
    labFileId: string;
    name: string;
    targets: Record<number, LabCsvMappingTarget>;
  },
): Promise<Result<{ profileId: string; name: string }>> {
  const preview = await previewLabImport(db, { crewId: input.crewId, labFileId: input.labFileId });
  if (!preview.ok) return preview;
  const mapping: Record<string, LabCsvMappingTarget> = {};
  const fields: Record<string, string> = {};
  const seen = new Map<string, string>();
  preview.value.columns.forEach((column, index) => {
    const target = input.targets[index] ?? findColumnTarget(column);
    mapping[column.header] = target;
    if (target === 'ignore') return;
    const other = seen.get(target);
    if (other !== undefined)
      fields[`col.${index}`] =
        `Column "${column.header}" and column "${other}" are both mapped to ${target}; map one of them to "ignore".`;
    else seen.set(target, column.header);
  });
  if (!Object.values(mapping).includes('bottle'))
    fields._ = 'Map one column to "Bottle code", or no row can be matched to a sample.';
  if (Object.keys(fields).length > 0) return refuse(400, 'invalid_mapping', 'The lab profile needs attention.', fields);
  const saved = await repo.upsertProfile(db, {
    crewId: input.crewId,
    name: input.name,
    signature: preview.value.headerSignature,
    mapping,
    sheetName: preview.value.sheet,
    createdBy: input.userId,
  });
  return succeed({ profileId: saved.id, name: saved.name });
}

/**
 * Write a previewed file in one transaction: the import record, samples created for unknown bottles,
 * earlier results moved to reading history, the readings, "results in" with a sample event, and the
 * findings and engine interval call of every sample whose history changed. Refused while any row is in error
 * or undecided; the crew always comes from the caller's session, never from the request.
 */
export async function confirmLabImport(
  db: Db,
  input: { crewId: string; userId: string; labFileId: string; decisions: Record<string, RowDecision> },
  hooks: ConfirmHooks = {},
): Promise<Result<ImportSummary>> {
  // Inside a caller's transaction (the demo seed) the import joins it; otherwise it is its own transaction.
  const inTransaction = <T>(work: (trx: Transaction<Database>) => Promise<T>): Promise<T> =>
    db.isTransaction ? work(db as Transaction<Database>) : db.transaction().execute(work);
  try {
    return await inTransaction(async (trx) => {
      // The preview, its rows and the reading columns live only inside writeConfirmedRows: by the time the
      // machines are judged again (the longest step) they are garbage, so a big file's peak memory holds one of
      // them, not both.
      const written = await writeConfirmedRows(trx, input, hooks);
      if (!written.ok) return written;
      const { summary, changed, known, fileName } = written.value;

      await recordSampleStates(
        trx,
        [...new Set(changed.map((s) => s.sampleId))],
        'results_in',
        input.userId,
        `Lab results imported from "${fileName}".`,
      );

      // Findings of every changed sample's machine, then of the young same-engine peers (one shared path with reviews).
      const findingsWritten = await recomputeChangedSamples(trx, changed, known);
      // Alert mails are queued in this transaction, so a rolled-back import sends nothing and a retry nothing twice.
      await queueImportAlerts(trx, summary.importId);

      const { newOilReferencesWritten, ...counts } = summary;
      return { ok: true as const, value: { ...counts, findingsWritten, newOilReferencesWritten } };
    });
  } catch (error) {
    // The unique lab_file_id of lab_imports: a confirm that raced another one for the same file.
    if ((error as { constraint?: string } | null)?.constraint === 'lab_imports_lab_file_id_key') {
      return refuse(409, 'already_imported', 'This file was already imported; nothing new was written.');
    }
    throw error;
  }
}

/**
 * The writing half of a confirm, in the caller's transaction: the preview again under the file's row lock, the
 * import record, samples for unknown bottles, earlier results to history, the readings and new-oil results.
 * Returns only what the judging half needs.
 */
async function writeConfirmedRows(
  trx: Transaction<Database>,
  input: { crewId: string; userId: string; labFileId: string; decisions: Record<string, RowDecision> },
  hooks: ConfirmHooks,
): Promise<
  Result<{
    summary: Omit<ImportSummary, 'findingsWritten'>;
    changed: { sampleId: string; machineId: string }[];
    known: Map<string, SamplePoint['readings']>;
    fileName: string;
  }>
> {
  if (isUuid(input.labFileId)) {
    // One confirm at a time per file: a second one waits here and then sees the first one's import.
    await repo.lockLabFile(trx, input.crewId, input.labFileId);
  }
  const previewed = await previewLabImport(trx, input);
  if (!previewed.ok) return previewed;
  const preview = previewed.value;
  if (preview.file.importId)
    return refuse(409, 'already_imported', 'This file was already imported; nothing new was written.');
  if (!preview.canConfirm) return refuseUnready(preview);

  const writes = preview.rows.filter((r) => r.decision !== null && r.decision.action !== 'skip');
  const readingsCount = writes.reduce((n, r) => n + Object.keys(r.readings).length, 0);
  const imported = await repo.insertLabImport(trx, {
    crewId: input.crewId,
    labFileId: preview.file.id,
    confirmedBy: input.userId,
    samplesWritten: writes.length,
    readingsWritten: readingsCount,
  });

  const sampleOf = new Map<number, { sampleId: string; machineId: string }>();
  let created = 0;
  const odometers = new Map<string, number>();
  for (const row of writes) {
    if (row.match.kind !== 'unknown') {
      sampleOf.set(row.line, { sampleId: row.match.sampleId, machineId: row.match.machineId });
      continue;
    }
    if (row.decision?.action !== 'create') continue;
    const machineId = row.decision.machineId;
    const odometer = odometers.get(machineId) ?? (await repo.findLatestOdometer(trx, machineId));
    odometers.set(machineId, odometer);
    const sample = await repo.insertSampleForRow(trx, {
      crewId: input.crewId,
      machineId,
      bottleCode: row.bottle,
      bottleCodeNorm: row.bottleNorm,
      drawnOn: row.sampled ?? row.reported ?? new Date().toISOString().slice(0, 10),
      odometer,
      createdBy: input.userId,
    });
    sampleOf.set(row.line, { sampleId: sample.id, machineId });
    created += 1;
  }

  const replacedIds = writes
    .filter((r) => r.decision?.action === 'replace')
    .map((r) => sampleOf.get(r.line)?.sampleId)
    .filter((id): id is string => id !== undefined);
  await repo.moveReadingsToHistory(trx, replacedIds, imported.id);

  const known = new Map<string, SamplePoint['readings']>();
  await repo.insertReadings(trx, readingColumns(writes, sampleOf, known), imported.id);
  // Before any findings: a new-oil reference in the same file is what this file's samples are judged against.
  const newOilReferencesWritten = await writeNewOilResults(
    trx,
    input.crewId,
    preview.newOilRows,
    imported.id,
    new Date().toISOString().slice(0, 10),
  );
  await hooks.afterReadings?.(trx);

  return succeed({
    summary: {
      importId: imported.id,
      samplesWritten: writes.length,
      readingsWritten: readingsCount,
      samplesCreated: created,
      samplesReplaced: replacedIds.length,
      newOilReferencesWritten,
    },
    changed: [...sampleOf.values()],
    known,
    fileName: preview.file.fileName,
  });
}

/**
 * Column arrays straight from the rows (no object per reading, for files of many thousand rows), noting each
 * written sample's readings in `known` for the judging that follows.
 */
function readingColumns(
  writes: readonly PreviewRow[],
  sampleOf: ReadonlyMap<number, { sampleId: string }>,
  known: Map<string, SamplePoint['readings']>,
): repo.ReadingColumns {
  const columns: repo.ReadingColumns = { sampleIds: [], measurands: [], values: [], qualifiers: [] };
  for (const row of writes) {
    const target = sampleOf.get(row.line);
    if (!target) continue;
    known.set(target.sampleId, row.readings);
    for (const measurand in row.readings) {
      const reading = row.readings[measurand as MeasurandCode];
      if (!reading) continue;
      columns.sampleIds.push(target.sampleId);
      columns.measurands.push(measurand);
      columns.values.push(reading.value);
      columns.qualifiers.push(reading.qualifier ?? null);
    }
  }
  return columns;
}

function refuseUnready(preview: ImportPreview): Refusal {
  const fields: Record<string, string> = {};
  for (const issue of preview.fileIssues)
    if (issue.severity === 'error') fields[issue.row === null ? 'file' : `line.${issue.row}`] ??= issue.message;
  for (const row of preview.rows) {
    if (row.needs === null) continue;
    const firstError = row.errors[0];
    fields[`row.${row.line}`] = row.decision?.action !== 'skip' && firstError ? firstError.message : row.needs;
  }
  for (const row of preview.newOilRows) if (row.errors[0]) fields[`row.${row.line}`] = row.errors[0].message;
  const n = Object.keys(fields).length;
  if (n === 0) return refuse(422, 'nothing_to_import', 'Every row is skipped, so there is nothing to write.');
  return refuse(
    422,
    'rows_need_attention',
    `Nothing was written: ${n} ${n === 1 ? 'problem needs' : 'problems need'} attention first.`,
    fields,
  );
}
