/**
 * Writers for the three invented lab report layouts of the demo (see sample-data/labs/). The demo seed
 * builds its histories as structured rows and writes them here, so the demo files exercise the reader
 * the same way a real upload does. Each layout round-trips through parseLabCsv.
 */
import { ELEMENT_CODES, type ElementCode, type MeasurandCode } from '../analysis/measurands';
import { neutraliseCsvCell } from './csv-cell';
import type { LabReading, LabReadings } from './lab-csv';
import { computeSayboltSeconds } from './saybolt';

export type LabCsvLayout = 'wide-symbols' | 'semicolon-names' | 'units-row-saybolt';

export const LAB_CSV_LAYOUTS: readonly LabCsvLayout[] = ['wide-symbols', 'semicolon-names', 'units-row-saybolt'];

/** One bottle's results, as the demo seed holds them. Dates are ISO yyyy-mm-dd. */
export interface LabReportRow {
  bottle: string;
  sampled?: string;
  reported?: string;
  readings: LabReadings;
}

/** Invented labs behind each layout (the demo scenario's own; no real lab). */
export const LAB_NAMES: Readonly<Record<LabCsvLayout, string>> = {
  'wide-symbols': 'Hollow Creek Oil Lab',
  'semicolon-names': 'Thistlefen Tribology Bench',
  'units-row-saybolt': 'Cinderpass Fluid Works',
};

const ELEMENT_NAMES: Readonly<Record<ElementCode, string>> = {
  Fe: 'Iron',
  Al: 'Aluminium',
  Cr: 'Chromium',
  Cu: 'Copper',
  Pb: 'Lead',
  Sn: 'Tin',
  Ni: 'Nickel',
  Ag: 'Silver',
  Ti: 'Titanium',
  V: 'Vanadium',
  Mn: 'Manganese',
  Si: 'Silicon',
  Na: 'Sodium',
  K: 'Potassium',
  B: 'Boron',
  Mo: 'Molybdenum',
  Zn: 'Zinc',
  P: 'Phosphorus',
  Ca: 'Calcium',
  Mg: 'Magnesium',
  Ba: 'Barium',
  S: 'Sulphur',
};

type Cell = (row: LabReportRow) => string;

interface LayoutColumn {
  header: string;
  unit?: string;
  cell: Cell;
}

interface LayoutSpec {
  delimiter: string;
  newline: string;
  bom: boolean;
  title?: string;
  unitsRow: boolean;
  columns: LayoutColumn[];
}

/** Plain decimal text of a number without exponent notation. */
function plain(value: number): string {
  const text = String(value);
  if (!/e/i.test(text)) return text;
  return value.toFixed(12).replace(/\.?0+$/, '');
}

/** Decimal comma, with a point grouping thousands: 1234.5 → "1.234,5". */
function decimalComma(value: number): string {
  const [int = '0', frac] = plain(value).split('.');
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, '.');
  return frac === undefined ? grouped : `${grouped},${frac}`;
}

function readingCell(code: MeasurandCode, format: (v: number) => string, notDetected: string): Cell {
  return (row) => {
    const reading: LabReading | undefined = row.readings[code];
    if (!reading) return '';
    if (reading.qualifier === '<' && reading.value === 0) return notDetected;
    return `${reading.qualifier ?? ''}${format(reading.value)}`;
  };
}

function glycolCell(yes: string, no: string): Cell {
  return (row) => {
    const reading = row.readings.GLYCOL;
    if (!reading) return '';
    return reading.value > 0 ? yes : no;
  };
}

const MONTH_ABBREVIATIONS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

function dateCell(field: 'sampled' | 'reported', style: 'iso' | 'dotted' | 'named'): Cell {
  return (row) => {
    const iso = row[field];
    if (iso === undefined) return '';
    const [y, m, d] = iso.split('-');
    if (style === 'iso' || y === undefined || m === undefined || d === undefined) return iso;
    if (style === 'dotted') return `${d}.${m}.${y}`;
    return `${Number(d)}-${MONTH_ABBREVIATIONS[Number(m) - 1] ?? m}-${y}`;
  };
}

const bottleCell: Cell = (row) => neutraliseCsvCell(row.bottle);

function round(value: number, places: number): number {
  const f = 10 ** places;
  return Math.round(value * f) / f;
}

const LAYOUTS: Readonly<Record<LabCsvLayout, LayoutSpec>> = {
  // A wide comma file with element symbols, ISO dates and the flash point in °F.
  'wide-symbols': {
    delimiter: ',',
    newline: '\n',
    bom: false,
    unitsRow: false,
    columns: [
      { header: 'Bottle', cell: bottleCell },
      { header: 'Sampled', cell: dateCell('sampled', 'iso') },
      { header: 'Reported', cell: dateCell('reported', 'iso') },
      ...ELEMENT_CODES.map((code) => ({ header: code, cell: readingCell(code, plain, 'ND') })),
      { header: 'KV40 cSt', cell: readingCell('KV40', plain, 'ND') },
      { header: 'KV100 cSt', cell: readingCell('KV100', plain, 'ND') },
      { header: 'VI', cell: readingCell('VI', plain, 'ND') },
      { header: 'TBN', cell: readingCell('TBN', plain, 'ND') },
      { header: 'TAN', cell: readingCell('TAN', plain, 'ND') },
      { header: 'Fuel %', cell: readingCell('FUEL', plain, 'ND') },
      { header: 'Water %', cell: readingCell('WATER', plain, 'ND') },
      { header: 'Glycol', cell: glycolCell('POS', 'NEG') },
      // °F to one decimal: 9/5 °C + 32.
      { header: 'Flash °F', cell: readingCell('FLASH', (c) => plain(round((c * 9) / 5 + 32, 1)), 'ND') },
      { header: 'Insol %', cell: readingCell('INSOL', plain, 'ND') },
    ],
  },
  // A semicolon file with full names, decimal commas, dotted day-first dates, a BOM and CRLF.
  'semicolon-names': {
    delimiter: ';',
    newline: '\r\n',
    bom: true,
    unitsRow: false,
    columns: [
      { header: 'Bottle code', cell: bottleCell },
      { header: 'Date sampled', cell: dateCell('sampled', 'dotted') },
      { header: 'Date reported', cell: dateCell('reported', 'dotted') },
      ...ELEMENT_CODES.map((code) => ({ header: ELEMENT_NAMES[code], cell: readingCell(code, decimalComma, 'n.d.') })),
      { header: 'Viscosity 40 °C (mm²/s)', cell: readingCell('KV40', decimalComma, 'n.d.') },
      { header: 'Viscosity 100 °C (mm²/s)', cell: readingCell('KV100', decimalComma, 'n.d.') },
      { header: 'Viscosity index', cell: readingCell('VI', decimalComma, 'n.d.') },
      { header: 'Base number (mg KOH/g)', cell: readingCell('TBN', decimalComma, 'n.d.') },
      { header: 'Acid number (mg KOH/g)', cell: readingCell('TAN', decimalComma, 'n.d.') },
      { header: 'Fuel dilution %', cell: readingCell('FUEL', decimalComma, 'n.d.') },
      { header: 'Water %', cell: readingCell('WATER', decimalComma, 'n.d.') },
      { header: 'Coolant', cell: glycolCell('positive', 'negative') },
      { header: 'Flash point °C', cell: readingCell('FLASH', decimalComma, 'n.d.') },
      { header: 'Insolubles %', cell: readingCell('INSOL', decimalComma, 'n.d.') },
    ],
  },
  // A tab file with a title line, names with symbols, a units row and Saybolt seconds at 210 °F; no insolubles.
  'units-row-saybolt': {
    delimiter: '\t',
    newline: '\n',
    bom: false,
    title: `${LAB_NAMES['units-row-saybolt']} - used oil report`,
    unitsRow: true,
    columns: [
      { header: 'Sample ID', cell: bottleCell },
      { header: 'Date Drawn', cell: dateCell('sampled', 'named') },
      { header: 'Date Reported', cell: dateCell('reported', 'named') },
      ...ELEMENT_CODES.map((code) => ({
        header: `${ELEMENT_NAMES[code]} (${code})`,
        unit: 'ppm',
        cell: readingCell(code, plain, 'ND'),
      })),
      { header: 'Viscosity 40 °C', unit: 'cSt', cell: readingCell('KV40', plain, 'ND') },
      {
        header: 'Viscosity 210 °F',
        unit: 'SUS',
        cell: (row) => {
          const sus =
            row.readings.SUS210?.value ??
            (row.readings.KV100 ? computeSayboltSeconds(row.readings.KV100.value, 210) : undefined);
          // Saybolt seconds to two decimals: finer than any lab reports, so the round trip stays within 0.01 mm²/s.
          return sus === undefined ? '' : plain(round(sus, 2));
        },
      },
      { header: 'VI', cell: readingCell('VI', plain, 'ND') },
      { header: 'TBN', unit: 'mg KOH/g', cell: readingCell('TBN', plain, 'ND') },
      { header: 'TAN', unit: 'mg KOH/g', cell: readingCell('TAN', plain, 'ND') },
      { header: 'Fuel', unit: '%', cell: readingCell('FUEL', plain, 'ND') },
      { header: 'Water', unit: '%', cell: readingCell('WATER', plain, 'ND') },
      { header: 'Glycol', cell: glycolCell('Yes', 'No') },
      { header: 'Flash Point', unit: '°C', cell: readingCell('FLASH', plain, 'ND') },
    ],
  },
};

function quote(cell: string, delimiter: string): string {
  if (cell.includes(delimiter) || /["\r\n]/.test(cell)) return `"${cell.replace(/"/g, '""')}"`;
  return cell;
}

/** Write structured lab rows as one of the demo layouts; the text parses back with parseLabCsv. */
export function formatLabCsv(layout: LabCsvLayout, rows: readonly LabReportRow[]): string {
  const spec = LAYOUTS[layout];
  const join = (cells: readonly string[]): string => cells.map((c) => quote(c, spec.delimiter)).join(spec.delimiter);
  const lines: string[] = [];
  if (spec.title !== undefined) lines.push(quote(spec.title, spec.delimiter));
  lines.push(join(spec.columns.map((c) => c.header)));
  if (spec.unitsRow) lines.push(join(spec.columns.map((c) => c.unit ?? '')));
  for (const row of rows) lines.push(join(spec.columns.map((c) => c.cell(row))));
  return `${spec.bom ? '\uFEFF' : ''}${lines.join(spec.newline)}${spec.newline}`;
}
