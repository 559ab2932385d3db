/**
 * Short explanations of the lab's abbreviations, shown once above the readings of a sample: only the terms its
 * readings use. Wording is common practice in used-oil analysis, no published source; the test methods named
 * in the long titles are those of the measurand catalogue (ASTM D445, D2270, D2896, D664).
 */
export interface GlossaryEntry {
  term: string;
  /** The full name, for an abbr title. */
  long: string;
  /** What it means to a rider. */
  plain: string;
}

const ENTRIES: readonly (GlossaryEntry & { codes: readonly string[] })[] = [
  {
    term: 'KV40 / KV100',
    codes: ['KV40', 'KV100'],
    long: 'Kinematic viscosity at 40 °C and at 100 °C, in mm²/s (ASTM D445)',
    plain: 'how thick the oil is warm and at running heat',
  },
  {
    term: 'VI',
    codes: ['VI'],
    long: 'Viscosity index (ASTM D2270)',
    plain: 'how little the thickness changes with temperature; higher is steadier',
  },
  {
    term: 'TBN / TAN',
    codes: ['TBN', 'TAN'],
    long: 'Total base number and total acid number, in mg KOH/g (ASTM D2896, D664)',
    plain: 'the detergent left to neutralise acids, and the acids built up',
  },
  {
    term: 'abs/cm',
    codes: ['OXI', 'NIT'],
    long: 'Infrared absorbance per centimetre',
    plain: 'how strongly aged or combustion-gas products show in the oil',
  },
];

const BELOW_DETECTION: GlossaryEntry = {
  term: '<',
  long: 'Below the detection limit (reported as ND, not detected, by some labs)',
  plain: 'below what the lab can detect; the figure is its detection limit',
};

/** The entries a sample's readings need, in a fixed order. */
export function glossaryFor(codes: readonly string[], hasBelowDetection: boolean): GlossaryEntry[] {
  const present = new Set(codes);
  const out: GlossaryEntry[] = ENTRIES.filter((e) => e.codes.some((c) => present.has(c))).map(
    ({ term, long, plain }) => ({ term, long, plain }),
  );
  if (hasBelowDetection) out.push(BELOW_DETECTION);
  return out;
}
