/**
 * CSV export of readings: one row per reading, with the sample's context. Text cells that a spreadsheet would
 * run as a formula are neutralised (OWASP CSV Injection) with the lab import's neutraliseCsvCell. Pure.
 */
import { neutraliseCsvCell } from '../lab-csv/csv-cell';
import { fromStoredMeter, roundTo, type MeterUnit } from '../units/units';

export interface ExportReading {
  machineName: string;
  meter: MeterUnit;
  bottleCode: string;
  drawnOn: string;
  odometerStored: number;
  distanceOnOilStored: number | null;
  grade: string | null;
  oilProduct: string;
  state: string;
  measurand: string;
  qualifier: '<' | '>' | null;
  value: number;
  unit: string;
  level: string;
}

export const READINGS_CSV_HEADER = [
  'machine',
  'bottle_code',
  'drawn_on',
  'odometer',
  'meter',
  'distance_on_oil',
  'sae_grade',
  'oil_product',
  'state',
  'measurand',
  'qualifier',
  'value',
  'unit',
  'level',
] as const;

/** One CSV field: neutralised when formula-like, quoted when it holds a comma, quote or line break (RFC 4180). */
export function formatCsvField(value: string | number | null): string {
  if (value === null) return '';
  const text = typeof value === 'number' ? String(value) : neutraliseCsvCell(value);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** A CSV line (CRLF-terminated, as RFC 4180 asks). */
export function formatCsvLine(fields: readonly (string | number | null)[]): string {
  return `${fields.map(formatCsvField).join(',')}\r\n`;
}

/** The whole export as text, header first. Distances in each machine's own meter unit. */
export function buildReadingsCsv(rows: Iterable<ExportReading>): string {
  let out = formatCsvLine(READINGS_CSV_HEADER);
  for (const r of rows) {
    const digits = r.meter === 'h' ? 1 : 0;
    out += formatCsvLine([
      r.machineName,
      r.bottleCode,
      r.drawnOn,
      roundTo(fromStoredMeter(r.odometerStored, r.meter), digits),
      r.meter,
      r.distanceOnOilStored === null ? null : roundTo(fromStoredMeter(r.distanceOnOilStored, r.meter), digits),
      r.grade,
      r.oilProduct,
      r.state,
      r.measurand,
      r.qualifier,
      r.value,
      r.unit,
      r.level,
    ]);
  }
  return out;
}

/** A file name safe for a Content-Disposition header. */
export function buildExportFileName(scope: string, today: string): string {
  const slug =
    scope
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-+|-+$/g, '')
      .slice(0, 40) || 'readings';
  return `sumpwise-${slug}-${today}.csv`;
}
