/**
 * Column recognition: what a lab's header text means. Labs write the same column many ways
 * ("Fe", "Iron", "Iron (Fe)", "FE ppm", "Fe [mg/kg]", "Visc 40C", "Viscosity @ 100 °C (cSt)");
 * this turns each into a measurand code and a unit, or says it is the bottle code or a date.
 */
import type { MeasurandCode } from '../analysis/measurands';
import { translateHeader } from './header-dictionary';

export type ColumnKind = 'measurand' | 'bottle' | 'sampled' | 'reported' | 'unknown' | 'ignored';

/** Units the reader understands. cSt and mm²/s are the same unit (1 cSt = 1 mm²/s, by definition). */
export type LabUnit = 'ppm' | '%' | 'mm²/s' | 'SUS' | '°C' | '°F' | 'mg KOH/g';

export interface RecognisedHeader {
  kind: ColumnKind;
  code?: MeasurandCode;
  unit?: LabUnit;
  /** Why a column that looked like a measurand could not be used, for the warning. */
  note?: string;
}

/** Full names of the ASTM D5185 elements, both spellings where English has two. */
const ELEMENT_NAMES: Readonly<Record<string, MeasurandCode>> = {
  iron: 'Fe',
  aluminum: 'Al',
  aluminium: 'Al',
  chromium: 'Cr',
  chrome: 'Cr',
  copper: 'Cu',
  lead: 'Pb',
  tin: 'Sn',
  nickel: 'Ni',
  silver: 'Ag',
  titanium: 'Ti',
  vanadium: 'V',
  manganese: 'Mn',
  silicon: 'Si',
  sodium: 'Na',
  potassium: 'K',
  boron: 'B',
  molybdenum: 'Mo',
  zinc: 'Zn',
  phosphorus: 'P',
  phosphorous: 'P',
  calcium: 'Ca',
  magnesium: 'Mg',
  barium: 'Ba',
  sulfur: 'S',
  sulphur: 'S',
};

const ELEMENT_SYMBOLS: Readonly<Record<string, MeasurandCode>> = {
  fe: 'Fe',
  al: 'Al',
  cr: 'Cr',
  cu: 'Cu',
  pb: 'Pb',
  sn: 'Sn',
  ni: 'Ni',
  ag: 'Ag',
  ti: 'Ti',
  v: 'V',
  mn: 'Mn',
  si: 'Si',
  na: 'Na',
  k: 'K',
  b: 'B',
  mo: 'Mo',
  zn: 'Zn',
  p: 'P',
  ca: 'Ca',
  mg: 'Mg',
  ba: 'Ba',
  s: 'S',
};

/** Words that add nothing to an element header ("ICP Iron", "Iron content"). */
const ELEMENT_NOISE = new Set(['icp', 'content', 'conc', 'concentration', 'total', 'metal', 'level']);

/** Unit patterns, matched on lower-cased NFKC text (so ² is 2 and the micro sign is μ). */
const UNIT_PATTERNS: ReadonlyArray<{ unit: LabUnit; pattern: RegExp }> = [
  { unit: 'mg KOH/g', pattern: /mg\s*koh\s*\/\s*g|mg\s*koh/g },
  { unit: 'ppm', pattern: /\bppm\b|\bmg\s*\/\s*kg\b|[μu]g\s*\/\s*g\b/g },
  { unit: 'mm²/s', pattern: /mm\s*(?:\^\s*)?2\s*\/\s*s(ec)?\b|\bcst\b|\bcentistokes?\b/g },
  { unit: 'SUS', pattern: /\bsus\b|\bssu\b|\bsaybolt(\s+universal)?(\s+seconds)?\b/g },
  { unit: '%', pattern: /%|\bpct\b|\bpercent\b/g },
  { unit: '°C', pattern: /°\s*c\b|\bdeg(rees)?\s*c\b/g },
  { unit: '°F', pattern: /°\s*f\b|\bdeg(rees)?\s*f\b/g },
];

/** A temperature written beside a viscosity: "40C", "100 °C", "210°F", "40 deg C". */
// No two neighbouring quantifiers can match the same text, so a long run of spaces is read in linear time.
const TEMPERATURE = /(\d{2,3})\s*(?:(?:°|deg(?:rees)?\.?)\s*)?([cf])(?![a-z])/;

/** Longest header (with its units cell) read; real lab headers are under 60 characters. */
export const MAX_HEADER_TEXT = 200;

function normaliseHeaderText(text: string): string {
  return text.normalize('NFKC').toLowerCase().replace(/º/g, '°').replace(/_/g, ' ').trim();
}

/** Find the unit written in `text` and return it with the text that remains once it is removed. */
function extractUnit(text: string): { unit?: LabUnit; rest: string } {
  let rest = text;
  let found: LabUnit | undefined;
  for (const { unit, pattern } of UNIT_PATTERNS) {
    pattern.lastIndex = 0;
    if (pattern.test(rest)) {
      found ??= unit;
      pattern.lastIndex = 0;
      rest = rest.replace(pattern, ' ');
    }
  }
  return found === undefined ? { rest } : { unit: found, rest };
}

/** True when a cell of a possible units row holds only a unit (and maybe a temperature), e.g. "ppm", "cSt @ 40 °C". */
export function isUnitCell(cell: string): boolean {
  if (cell.length > MAX_HEADER_TEXT) return false;
  const { unit, rest } = extractUnit(normaliseHeaderText(cell));
  if (unit === undefined) return false;
  // Whatever is left may be a temperature, "@" or "at", and punctuation, but no other words.
  return !/[a-z]/.test(rest.replace(TEMPERATURE, ' ').replace(/\bat\b/g, ' '));
}

function tokensOf(text: string): string[] {
  return text.split(/[^a-z0-9μ]+/).filter((t) => t !== '');
}

const SAMPLED_WORDS = new Set(['sampled', 'sampling', 'drawn', 'drained', 'taken', 'collected']);
const REPORTED_WORDS = new Set([
  'reported',
  'report',
  'completed',
  'tested',
  'test',
  'analysed',
  'analyzed',
  'issued',
  'finalised',
  'finalized',
]);
const BOTTLE_WORDS = new Set(['bottle', 'kit', 'tag', 'container']);
const SAMPLE_ID_WORDS = new Set(['id', 'no', 'nr', 'number', 'code', 'ref', 'reference', 'num']);
const VISCOSITY_WORDS = new Set(['visc', 'viscosity', 'vis', 'kv', 'kin', 'kinematic']);

function recogniseDateOrBottle(tokens: readonly string[], raw: string): RecognisedHeader | null {
  const has = (w: string): boolean => tokens.includes(w);
  const isDate = has('date') || tokens.some((t) => SAMPLED_WORDS.has(t)) || has('reported');
  if (isDate) {
    if (tokens.some((t) => SAMPLED_WORDS.has(t)) || has('sample')) return { kind: 'sampled' };
    if (tokens.some((t) => REPORTED_WORDS.has(t))) return { kind: 'reported' };
    return null;
  }
  if (tokens.some((t) => BOTTLE_WORDS.has(t))) return { kind: 'bottle' };
  if (has('sample') && (tokens.some((t) => SAMPLE_ID_WORDS.has(t)) || raw.includes('#') || tokens.length === 1)) {
    return { kind: 'bottle' };
  }
  return null;
}

/** Temperature of a viscosity header in °C (or °F for Saybolt), from "40C", "@100 °C", "KV100", "210F". */
function findTemperature(text: string, tokens: readonly string[]): { value: number; scale: 'c' | 'f' | '?' } | null {
  const match = TEMPERATURE.exec(text);
  if (match?.[1] !== undefined && match[2] !== undefined) {
    return { value: Number(match[1]), scale: match[2] === 'f' ? 'f' : 'c' };
  }
  for (const token of tokens) {
    const glued = /^(?:kv|v|vis|visc|sus|ssu)(40|100|210)$/.exec(token);
    if (glued?.[1] !== undefined) return { value: Number(glued[1]), scale: '?' };
    if (token === '40' || token === '100' || token === '210' || token === '104' || token === '212') {
      return { value: Number(token), scale: '?' };
    }
  }
  return null;
}

function recogniseViscosity(
  text: string,
  tokens: readonly string[],
  unit: LabUnit | undefined,
): RecognisedHeader | null {
  const has = (w: string): boolean => tokens.includes(w);
  const glued = tokens.some((t) => /^(kv|v|vis|visc|sus|ssu)(40|100|210)$/.test(t));
  const saybolt = unit === 'SUS' || tokens.some((t) => /^(sus|ssu)(210)?$/.test(t));
  if (has('vi') || (has('index') && tokens.some((t) => VISCOSITY_WORDS.has(t)))) {
    return { kind: 'measurand', code: 'VI' };
  }
  if (!saybolt && !glued && !tokens.some((t) => VISCOSITY_WORDS.has(t))) return null;
  const temperature = findTemperature(text, tokens);
  if (saybolt) {
    if (temperature?.value === 210 && temperature.scale !== 'c')
      return { kind: 'measurand', code: 'SUS210', unit: 'SUS' };
    return {
      kind: 'unknown',
      note: 'Saybolt seconds are read only at 210 °F (ASTM D2161); this column gives no temperature or another one',
    };
  }
  if (temperature === null)
    return { kind: 'unknown', note: 'a viscosity column needs its temperature (40 °C or 100 °C)' };
  const { value, scale } = temperature;
  // 104 °F = 40 °C and 212 °F = 100 °C exactly.
  if ((value === 40 && scale !== 'f') || (value === 104 && scale !== 'c'))
    return { kind: 'measurand', code: 'KV40', unit: 'mm²/s' };
  if ((value === 100 && scale !== 'f') || (value === 212 && scale !== 'c'))
    return { kind: 'measurand', code: 'KV100', unit: 'mm²/s' };
  return {
    kind: 'unknown',
    note: `viscosity is read at 40 °C and 100 °C only, not at ${value} °${scale === 'f' ? 'F' : 'C'}`,
  };
}

function recogniseCondition(tokens: readonly string[], unit: LabUnit | undefined): RecognisedHeader | null {
  const has = (w: string): boolean => tokens.includes(w);
  const any = (...ws: string[]): boolean => ws.some(has);
  if (any('tbn', 'bn') || (has('base') && has('number'))) return { kind: 'measurand', code: 'TBN', unit: 'mg KOH/g' };
  if (any('tan', 'an') || (has('acid') && has('number'))) return { kind: 'measurand', code: 'TAN', unit: 'mg KOH/g' };
  if (has('fuel')) return { kind: 'measurand', code: 'FUEL', unit: '%' };
  if (any('water', 'h2o', 'moisture')) return { kind: 'measurand', code: 'WATER', unit: unit === 'ppm' ? 'ppm' : '%' };
  if (any('glycol', 'coolant', 'antifreeze')) return { kind: 'measurand', code: 'GLYCOL' };
  if (any('flash', 'flashpoint')) return { kind: 'measurand', code: 'FLASH', unit: unit === '°F' ? '°F' : '°C' };
  if (any('insol', 'insolubles', 'insoluble')) return { kind: 'measurand', code: 'INSOL', unit: '%' };
  // Infrared oxidation and nitration (absorbance per cm, ASTM E2412); the unit stays as the catalogue gives it.
  if (any('oxidation', 'oxi')) return { kind: 'measurand', code: 'OXI' };
  if (any('nitration', 'nitr', 'nit')) return { kind: 'measurand', code: 'NIT' };
  return null;
}

function recogniseElement(tokens: readonly string[], unit: LabUnit | undefined): RecognisedHeader | null {
  const words = tokens.filter((t) => !ELEMENT_NOISE.has(t));
  if (words.length === 0 || words.length > 2) return null;
  let code: MeasurandCode | undefined;
  for (const word of words) {
    const found = ELEMENT_NAMES[word] ?? ELEMENT_SYMBOLS[word];
    // "Iron (Fe)" names one element twice; "Fe Cu" or "Iron Tin" is not one column.
    if (found === undefined || (code !== undefined && code !== found)) return null;
    code = found;
  }
  if (code === undefined) return null;
  return { kind: 'measurand', code, unit: unit === '%' ? '%' : 'ppm' };
}

/** Read one header (and the cell under it in a units row, if the file has one) as a column meaning. */
export function recogniseHeader(header: string, unitsCell = ''): RecognisedHeader {
  if (header.length + unitsCell.length > MAX_HEADER_TEXT) return { kind: 'unknown' };
  // Headers in other languages are read through the one dictionary ("Eisen" → "iron").
  const text = translateHeader(normaliseHeaderText(`${header} ${unitsCell}`)).text;
  const { unit, rest } = extractUnit(text);
  const tokens = tokensOf(rest);
  const rawTokens = tokensOf(text);
  if (tokens.length === 0 && unit === undefined) return { kind: 'unknown' };
  if (rawTokens.includes('sus210') || rawTokens.includes('ssu210'))
    return { kind: 'measurand', code: 'SUS210', unit: 'SUS' };
  return (
    recogniseDateOrBottle(tokens, text) ??
    recogniseViscosity(text, rawTokens, unit) ??
    recogniseCondition(tokens, unit) ??
    recogniseElement(tokens, unit) ?? { kind: 'unknown' }
  );
}
