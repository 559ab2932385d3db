/**
 * The most serious finding of a sample in a few plain words, for a table cell or a card heading ("fuel in the
 * oil", "aluminium climbing"). Pure: built from the rule and its main measurand, never from a rule title and a code.
 */
import type { RuleId } from './types';
import { getMeasurand, isMeasurandCode } from './measurands';

/** What a rider calls each measurand in a short phrase; anything not named here uses the catalogue's name. */
const PLAIN_NAME: Partial<Record<string, string>> = {
  KV40: 'viscosity',
  KV100: 'viscosity',
  VI: 'viscosity index',
  SUS210: 'viscosity',
  FLASH: 'flash point',
  FUEL: 'fuel',
  WATER: 'water',
  GLYCOL: 'coolant',
  INSOL: 'insolubles',
  TBN: 'base reserve',
  TAN: 'acid number',
  OXI: 'oxidation',
  NIT: 'nitration',
};

/** The coolant markers (sodium, potassium, boron, glycol) point to one cause, so they share one phrase. */
const COOLANT = new Set(['Na', 'K', 'B', 'GLYCOL']);
/** Silicon is the dirt marker (PRODUCT.md: dirt past the air filter). */
const DIRT = new Set(['Si']);

function nameOf(measurand: string | null): string | null {
  if (measurand === null) return null;
  const plain = PLAIN_NAME[measurand];
  if (plain) return plain;
  return isMeasurandCode(measurand) ? getMeasurand(measurand).name.toLowerCase() : null;
}

/**
 * A short reason for a finding, lower case so it reads inside a sentence. Unknown rules (an older engine's
 * stored finding) fall back to the measurand, then to a neutral phrase.
 */
export function describeFindingReason(ruleId: RuleId | string, measurand: string | null): string {
  const m = measurand ?? '';
  const name = nameOf(measurand);
  switch (ruleId as RuleId) {
    case 'coolant-markers':
      return 'coolant markers rising';
    case 'fuel-dilution':
      return 'fuel in the oil';
    case 'dirt':
      return 'dirt getting in';
    case 'flash-point':
      return 'flash point low: fuel in the oil?';
    case 'clutch-friction':
      return 'clutch material in the oil';
    case 'additive-mismatch':
      return 'a different or mixed oil';
    case 'viscosity-grade':
      return 'oil out of its grade';
    case 'viscosity-change':
      return 'viscosity changed from new';
    case 'climbing-trend':
      if (COOLANT.has(m)) return 'coolant markers rising';
      if (DIRT.has(m)) return 'dirt getting in';
      return name ? `${name} climbing` : 'a reading climbing';
    case 'baseline-jump':
      if (COOLANT.has(m)) return 'coolant markers rising';
      if (DIRT.has(m)) return 'dirt getting in';
      return name ? `${name} well above normal` : 'a reading well above normal';
    case 'fixed-limit':
      if (m === 'FUEL') return 'fuel in the oil';
      if (m === 'WATER') return 'water in the oil';
      if (DIRT.has(m)) return 'dirt getting in';
      return name ? `${name} past the alert limit` : 'a reading past an alert limit';
    case 'condition-trend':
      return name ? `${name} changing: oil ageing` : 'the oil ageing';
    default:
      return name ? `${name} out of the usual` : 'a finding to read';
  }
}

/** The same reason with a capital first letter, for the start of a line. */
export function capitalise(text: string): string {
  return text ? text[0]!.toUpperCase() + text.slice(1) : text;
}
