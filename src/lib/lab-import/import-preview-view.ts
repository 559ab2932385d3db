/**
 * What the import preview page shows, built from the service's preview: every text, link, choice and flag the
 * page renders, so the page holds no logic. Pure: no database, no Astro.
 */
import type { LabCsvColumn, LabReadings } from '../lab-csv/lab-csv';
import { describeSayboltConvention } from '../lab-csv/saybolt';
import { formatCount } from '../words/words';
import { formatDay, formatMoment } from '../words/dates';
import {
  describeMappingTarget,
  findColumnTarget,
  formatColumnField,
  formatDecisionField,
  MAPPING_TARGETS,
  selectPreviewRows,
  type ImportPreview,
  type PreviewRow,
  type PreviewRowFilter,
  type RowDecision,
} from './lab-import';

export interface PreviewViewInput {
  labFileId: string;
  preview: ImportPreview;
  /** The decisions posted with the form (empty on a plain visit). */
  decisions: Record<string, RowDecision>;
  /** Field errors of the last post, by field name. */
  fields: Record<string, string>;
  filter: PreviewRowFilter;
  /** The profile name the user typed, when a save was refused. */
  profileName?: string | undefined;
  /** The viewer's zone; times show in UTC without one. */
  timeZone?: string | null | undefined;
}

export interface Choice {
  value: string;
  label: string;
  selected: boolean;
}

/** The sample cell of a row. */
export type SampleCell =
  | { kind: 'link'; href: string; text: string }
  | { kind: 'text'; text: string; existing: number | null }
  | { kind: 'none'; text: string }
  | { kind: 'unknown'; text: string };

export interface RowView {
  line: number;
  bottle: string;
  /** The row needs a choice before the import can be confirmed (marked, and its select invalid). */
  needsChoice: boolean;
  sample: SampleCell;
  readings: string;
  /** More readings than are listed: the cell ends with an ellipsis. */
  moreReadings: boolean;
  /** After the import: "✓ Written" or "– Not written". */
  result: string;
  field: string;
  choices: Choice[];
  /** The id of the messages below the row, null when there are none to show. */
  messagesId: string | null;
  messages: { tone: 'error' | 'note'; text: string }[];
}

export interface ColumnView {
  index: number;
  header: string;
  unit: string | null;
  readAs: string;
  field: string;
  error: string | null;
  choices: Choice[];
}

export interface PreviewView {
  imported: boolean;
  uploadedAt: string;
  /** Links to the samples an import wrote (at most 20). */
  writtenLinks: { href: string; text: string }[];
  writtenRows: number;
  notWrittenRows: number;
  attention: number;
  hiddenBlocking: number;
  hiddenReady: number;
  filterHref: Record<PreviewRowFilter, string>;
  /** Choices made for rows no longer listed: they travel along as hidden fields. */
  carried: { name: string; value: string }[];
  rows: RowView[];
  confirmLabel: string;
  /** "3 rows" and "needs"/"need", for the sentence saying why nothing can be written yet. */
  blockedRows: string;
  blockedVerb: 'needs' | 'need';
  sayboltNote: string | null;
  columns: ColumnView[];
  columnsRead: number;
  profileOpen: boolean;
  profileName: string;
}

/** How many readings a row lists before the ellipsis. */
const LISTED_READINGS = 8;
/** How many written samples the "imported" box links to. */
const WRITTEN_LINKS = 20;

/** A decision as its select value: "write", "replace", "skip" or "create:<machine id>"; none: "". */
export function decisionValue(d: RowDecision | null): string {
  return d === null ? '' : d.action === 'create' ? `create:${d.machineId}` : d.action;
}

/**
 * A figure of the lab file, nearly as written: two decimals, one from 100. The preview shows more digits than
 * the rounded screens (formatFigure), since it is where a misread cell is caught.
 */
export function formatFileFigure(v: number): string {
  return Math.abs(v) >= 100 ? String(Math.round(v * 10) / 10) : String(Math.round(v * 100) / 100);
}

/** One reading as the preview lists it: "ND" for a zero below detection, else qualifier and figure. */
export function formatPreviewReading(reading: { value: number; qualifier?: string | undefined } | undefined): string {
  if (!reading) return '';
  return reading.qualifier === '<' && reading.value === 0
    ? 'ND'
    : `${reading.qualifier ?? ''}${formatFileFigure(reading.value)}`;
}

/** The first readings of a row: "Fe 12 · Cu ND · Si 4.5". */
export function describeRowReadings(readings: LabReadings): string {
  return Object.entries(readings)
    .slice(0, LISTED_READINGS)
    .map(([code, reading]) => `${code} ${formatPreviewReading(reading)}`)
    .join(' · ');
}

/** What a column was read as: "Iron (ppm) (converted …)", "Not recognised", "Ignored: why". */
export function describeColumnReading(c: LabCsvColumn): string {
  if (c.kind === 'measurand')
    return `${describeMappingTarget(findColumnTarget(c))}${c.conversion ? ` (converted ${c.conversion})` : ''}`;
  if (c.kind === 'unknown') return 'Not recognised';
  if (c.kind === 'ignored') return `Ignored${c.note ? `: ${c.note}` : ''}`;
  return describeMappingTarget(c.kind);
}

function sampleCell(r: PreviewRow, imported: boolean): SampleCell {
  if (imported) {
    return r.match.kind === 'unknown'
      ? { kind: 'none', text: 'No sample' }
      : {
          kind: 'link',
          href: `/samples/${r.match.sampleId}`,
          text: `${r.match.machineName} · drawn ${formatDay(r.match.drawnOn)}`,
        };
  }
  if (r.match.kind === 'unknown') return { kind: 'unknown', text: 'Unknown bottle' };
  return {
    kind: 'text',
    text: `${r.match.machineName} · drawn ${formatDay(r.match.drawnOn)}`,
    existing: r.match.kind === 'has-results' ? r.match.existing : null,
  };
}

/** The choices of a row's select: "Choose…" while undecided or in error, then what its match allows, then skip. */
export function rowChoices(r: PreviewRow, machines: readonly { id: string; name: string }[]): Choice[] {
  const current = decisionValue(r.decision);
  const clean = r.errors.length === 0;
  const choices: Choice[] = [];
  if (r.decision === null || !clean) choices.push({ value: '', label: 'Choose…', selected: r.decision === null });
  if (clean && r.match.kind === 'matched')
    choices.push({ value: 'write', label: 'Write to this sample', selected: current === 'write' });
  if (clean && r.match.kind === 'has-results')
    choices.push({
      value: 'replace',
      label: 'Replace its results (old ones kept in history)',
      selected: current === 'replace',
    });
  if (clean && r.match.kind === 'unknown') {
    for (const m of machines)
      choices.push({
        value: `create:${m.id}`,
        label: `Create the sample on ${m.name}`,
        selected: current === `create:${m.id}`,
      });
  }
  choices.push({ value: 'skip', label: 'Skip this row', selected: current === 'skip' });
  return choices;
}

function rowView(r: PreviewRow, preview: ImportPreview, imported: boolean): RowView {
  const hasMessages = !imported && (r.needs !== null || r.errors.length > 0 || r.warnings.length > 0);
  return {
    line: r.line,
    bottle: r.bottle,
    needsChoice: Boolean(r.needs),
    sample: sampleCell(r, imported),
    readings: describeRowReadings(r.readings) || '—',
    moreReadings: Object.keys(r.readings).length > LISTED_READINGS,
    result: r.written ? '✓ Written' : '– Not written',
    field: formatDecisionField(r.line),
    choices: imported ? [] : rowChoices(r, preview.machines),
    messagesId: hasMessages ? `row-${r.line}-msg` : null,
    messages: hasMessages
      ? [
          ...r.errors.map((e) => ({ tone: 'error' as const, text: e.message })),
          ...(r.needs && r.errors.length === 0 ? [{ tone: 'error' as const, text: r.needs }] : []),
          ...r.warnings.map((w) => ({ tone: 'note' as const, text: w.message })),
        ]
      : [],
  };
}

/** The preview page's model. */
export function buildPreviewView(input: PreviewViewInput): PreviewView {
  const { preview, decisions, fields, filter } = input;
  const imported = preview.file.importId !== null;
  const rows = preview.rows;
  const { shown, attention, hiddenBlocking, hiddenReady } = selectPreviewRows(rows, filter);
  const shownLines = new Set(shown.map((r) => r.line));
  const base = `/imports/${encodeURIComponent(input.labFileId)}`;
  const { counts } = preview;
  const newOil =
    preview.newOilRows.length > 0 ? `, ${formatCount(preview.newOilRows.length, 'new-oil reference')}` : '';
  return {
    imported,
    uploadedAt: formatMoment(preview.file.uploadedAt, input.timeZone),
    writtenLinks: rows
      .flatMap((r) =>
        r.match.kind === 'unknown'
          ? []
          : [
              {
                href: `/samples/${r.match.sampleId}`,
                text: `Bottle ${r.bottle} · ${r.match.machineName} · ${formatDay(r.match.drawnOn)}`,
              },
            ],
      )
      .slice(0, WRITTEN_LINKS),
    writtenRows: rows.filter((r) => r.written).length,
    notWrittenRows: rows.filter((r) => !r.written).length,
    attention,
    hiddenBlocking,
    hiddenReady,
    filterHref: { all: `${base}#rows-h`, attention: `${base}?rows=attention#rows-h` },
    carried: Object.entries(decisions)
      .filter(([line]) => !shownLines.has(Number(line)))
      .map(([line, d]) => ({ name: formatDecisionField(Number(line)), value: decisionValue(d) })),
    rows: shown.map((r) => rowView(r, preview, imported)),
    confirmLabel: `Confirm import: ${formatCount(counts.ready, 'sample')}, ${formatCount(counts.readings, 'reading')}${newOil}`,
    blockedRows: formatCount(counts.blocked, 'row'),
    blockedVerb: counts.blocked === 1 ? 'needs' : 'need',
    sayboltNote: describeSayboltConvention(preview.columns),
    columns: preview.columns.map((c) => {
      const field = formatColumnField(c.index);
      const target = findColumnTarget(c);
      return {
        index: c.index,
        header: c.header,
        unit: c.unit ?? null,
        readAs: describeColumnReading(c),
        field,
        error: fields[field] ?? null,
        choices: MAPPING_TARGETS.map((t) => ({ value: t, label: describeMappingTarget(t), selected: t === target })),
      };
    }),
    columnsRead: preview.columns.filter((c) => c.kind !== 'unknown' && c.kind !== 'ignored').length,
    profileOpen:
      preview.columns.some((c) => c.kind === 'unknown') ||
      preview.fileIssues.some((i) => i.severity === 'error') ||
      Object.keys(fields).some((k) => k.startsWith('col.') || k === '_' || k === 'profileName'),
    profileName:
      input.profileName ?? preview.profile?.name ?? preview.file.fileName.replace(/\.[a-z]+$/i, '').slice(0, 80),
  };
}
