/**
 * The measurand catalogue: every element of the ASTM D5185 ICP set and the oil-condition figures a lab
 * reports. Codes are the canonical keys used from the lab import to the database to the screen.
 *
 * The "points to" sentences are common practice in used-oil analysis for motorcycle engines (no single
 * published source); the interface must show them as advice, never as a diagnosis.
 */

export type MeasurandGroup = 'wear' | 'contaminant' | 'additive' | 'condition';

/** Element codes of ASTM D5185 (ICP-AES, used and unused oils). */
export const ELEMENT_CODES = [
  'Fe',
  'Al',
  'Cr',
  'Cu',
  'Pb',
  'Sn',
  'Ni',
  'Ag',
  'Ti',
  'V',
  'Mn',
  'Si',
  'Na',
  'K',
  'B',
  'Mo',
  'Zn',
  'P',
  'Ca',
  'Mg',
  'Ba',
  'S',
] as const;

/**
 * Oil-condition figures. KV40/KV100 in mm²/s (ASTM D445), VI (ASTM D2270), SUS210 (ASTM D2161); oxidation and
 * nitration by infrared, in absorbance per cm (ASTM E2412 trend analysis).
 */
export const CONDITION_CODES = [
  'KV40',
  'KV100',
  'VI',
  'SUS210',
  'FLASH',
  'FUEL',
  'WATER',
  'GLYCOL',
  'INSOL',
  'TBN',
  'TAN',
  'OXI',
  'NIT',
] as const;

export type ElementCode = (typeof ELEMENT_CODES)[number];
export type ConditionCode = (typeof CONDITION_CODES)[number];
export type MeasurandCode = ElementCode | ConditionCode;

export const MEASURAND_CODES: readonly MeasurandCode[] = [...ELEMENT_CODES, ...CONDITION_CODES];

/** True when `code` is one of the catalogue's codes (exact case). */
export function isMeasurandCode(code: string): code is MeasurandCode {
  return (MEASURAND_CODES as readonly string[]).includes(code);
}

/** Which way a reading moves when it becomes a concern. */
export type ConcernDirection = 'up' | 'down' | 'both';

export interface MeasurandInfo {
  code: MeasurandCode;
  name: string;
  /** Unit as labs report it: elements in mg/kg (ppm). GLYCOL is 1 when present, 0 when absent. */
  unit: string;
  group: MeasurandGroup;
  concern: ConcernDirection;
  /** What a change usually points to in a motorcycle engine (common practice, no published source). */
  pointsTo: string;
}

// Wear/contaminant/additive grouping follows shared/PRODUCT.md. Boron sits with the contaminants because in
// a liquid-cooled engine it is a coolant marker, though many oils also carry it as an additive.
const CATALOGUE: Record<MeasurandCode, Omit<MeasurandInfo, 'code'>> = {
  Fe: {
    name: 'Iron',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Cylinders, rings, crankshaft, camshaft and gears (the gearbox shares the oil in most bikes).',
  },
  Al: {
    name: 'Aluminium',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Pistons, bores and bearings; together with silicon, dirt getting past the air filter.',
  },
  Cr: { name: 'Chromium', unit: 'ppm', group: 'wear', concern: 'up', pointsTo: 'Piston rings and some plated bores.' },
  Cu: {
    name: 'Copper',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo:
      "Bushings, bearings, oil cooler and wet-clutch parts; early in an oil's life often leaching rather than wear.",
  },
  Pb: {
    name: 'Lead',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Bearing overlays (plain crank and rod bearings).',
  },
  Sn: {
    name: 'Tin',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Bearing overlays and some piston coatings.',
  },
  Ni: {
    name: 'Nickel',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Nickel-plated bores and some valve-train and gear steels.',
  },
  Ag: {
    name: 'Silver',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Silver-plated bearings or solder; rare in motorcycle engines.',
  },
  Ti: {
    name: 'Titanium',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Titanium valves or connecting rods in some high-performance engines; some oils carry it as an additive.',
  },
  V: {
    name: 'Vanadium',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Alloy steels; rarely significant in a motorcycle engine.',
  },
  Mn: {
    name: 'Manganese',
    unit: 'ppm',
    group: 'wear',
    concern: 'up',
    pointsTo: 'Alloy steels of gears, shafts and valve-train parts.',
  },
  Si: {
    name: 'Silicon',
    unit: 'ppm',
    group: 'contaminant',
    concern: 'up',
    pointsTo: 'Dirt past the air filter or intake boots; also silicone sealant and antifoam additive.',
  },
  Na: {
    name: 'Sodium',
    unit: 'ppm',
    group: 'contaminant',
    concern: 'up',
    pointsTo: 'Coolant in the oil (liquid-cooled engines); some oils carry it as an additive.',
  },
  K: {
    name: 'Potassium',
    unit: 'ppm',
    group: 'contaminant',
    concern: 'up',
    pointsTo: 'Coolant in the oil (liquid-cooled engines).',
  },
  B: {
    name: 'Boron',
    unit: 'ppm',
    group: 'contaminant',
    concern: 'up',
    pointsTo: 'Coolant in the oil (liquid-cooled engines); many oils also carry boron as an additive.',
  },
  Mo: {
    name: 'Molybdenum',
    unit: 'ppm',
    group: 'additive',
    concern: 'both',
    pointsTo: 'Friction-modifier additive; a sudden change means a different or mixed oil.',
  },
  Zn: {
    name: 'Zinc',
    unit: 'ppm',
    group: 'additive',
    concern: 'both',
    pointsTo: 'Anti-wear additive (ZDDP); a sudden change means a different or mixed oil.',
  },
  P: {
    name: 'Phosphorus',
    unit: 'ppm',
    group: 'additive',
    concern: 'both',
    pointsTo: 'Anti-wear additive (ZDDP); a sudden change means a different or mixed oil.',
  },
  Ca: {
    name: 'Calcium',
    unit: 'ppm',
    group: 'additive',
    concern: 'both',
    pointsTo: 'Detergent additive; a sudden change means a different or mixed oil.',
  },
  Mg: {
    name: 'Magnesium',
    unit: 'ppm',
    group: 'additive',
    concern: 'both',
    pointsTo: 'Detergent additive; a sudden change means a different or mixed oil.',
  },
  Ba: {
    name: 'Barium',
    unit: 'ppm',
    group: 'additive',
    concern: 'both',
    pointsTo: 'Detergent additive, uncommon in current engine oils.',
  },
  S: {
    name: 'Sulfur',
    unit: 'ppm',
    group: 'additive',
    concern: 'both',
    pointsTo: 'Base oil and additive sulfur; a sudden change means a different or mixed oil.',
  },
  KV40: {
    name: 'Kinematic viscosity at 40 °C',
    unit: 'mm²/s',
    group: 'condition',
    concern: 'both',
    pointsTo:
      'Thinning from fuel or shear (the gearbox shears oil in shared-sump bikes); thickening from oxidation or soot.',
  },
  KV100: {
    name: 'Kinematic viscosity at 100 °C',
    unit: 'mm²/s',
    group: 'condition',
    concern: 'both',
    pointsTo:
      'Whether the oil still holds its SAE grade: thinning from fuel or gearbox shear, thickening from oxidation.',
  },
  VI: {
    name: 'Viscosity index',
    unit: '',
    group: 'condition',
    concern: 'down',
    pointsTo: 'How much the viscosity changes with temperature; a drop often follows shear of the viscosity modifier.',
  },
  SUS210: {
    name: 'Saybolt seconds at 210 °F',
    unit: 's',
    group: 'condition',
    concern: 'both',
    pointsTo: 'The same information as KV100 in older units.',
  },
  FLASH: {
    name: 'Flash point',
    unit: '°C',
    group: 'condition',
    concern: 'down',
    pointsTo: 'A low flash point usually means fuel in the oil.',
  },
  FUEL: {
    name: 'Fuel dilution',
    unit: '%',
    group: 'condition',
    concern: 'up',
    pointsTo: 'Short trips that never warm the oil, rich running or injector trouble.',
  },
  WATER: {
    name: 'Water',
    unit: '%',
    group: 'condition',
    concern: 'up',
    pointsTo: 'Condensation from short trips or washing, or coolant in liquid-cooled engines.',
  },
  GLYCOL: {
    name: 'Glycol (coolant)',
    unit: 'present',
    group: 'condition',
    concern: 'up',
    pointsTo: 'Coolant reaching the oil: head gasket, water pump seal or cooler (liquid-cooled engines).',
  },
  INSOL: {
    name: 'Insolubles',
    unit: '%',
    group: 'condition',
    concern: 'up',
    pointsTo: 'Soot, oxidation products and dirt the oil can no longer hold in suspension.',
  },
  TBN: {
    name: 'Total base number',
    unit: 'mg KOH/g',
    group: 'condition',
    concern: 'down',
    pointsTo: 'Reserve of detergent left to neutralise acids; a low figure means the oil is spent.',
  },
  TAN: {
    name: 'Total acid number',
    unit: 'mg KOH/g',
    group: 'condition',
    concern: 'up',
    pointsTo: 'Acids from oxidation and combustion; a rising figure means the oil is ageing.',
  },
  OXI: {
    name: 'Oxidation',
    unit: 'abs/cm',
    group: 'condition',
    concern: 'up',
    pointsTo:
      'The oil ageing from heat and air; a rising figure means it is wearing out, often on long or hot intervals.',
  },
  NIT: {
    name: 'Nitration',
    unit: 'abs/cm',
    group: 'condition',
    concern: 'up',
    pointsTo: 'Combustion gases reaching the oil past the rings; rises with blow-by, lean running or long idling.',
  },
};

/** The whole catalogue, in MEASURAND_CODES order. */
export const MEASURANDS: readonly Readonly<MeasurandInfo>[] = MEASURAND_CODES.map((code) =>
  Object.freeze({ code, ...CATALOGUE[code] }),
);

// Built once: the rules look entries up on every reading, so no object is allocated per look-up.
const BY_CODE = new Map<MeasurandCode, Readonly<MeasurandInfo>>(MEASURANDS.map((m) => [m.code, m]));

/** Look up one measurand's catalogue entry. */
export function getMeasurand(code: MeasurandCode): Readonly<MeasurandInfo> {
  return BY_CODE.get(code)!;
}

/** Codes of one group, in catalogue order. */
export function listMeasurandsOfGroup(group: MeasurandGroup): MeasurandCode[] {
  return MEASURAND_CODES.filter((code) => CATALOGUE[code].group === group);
}
