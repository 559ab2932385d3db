import { describe, expect, test } from 'vitest';
import { isUnitCell, recogniseHeader } from '~/lib/lab-csv/column-recognition';
import { ELEMENT_CODES } from '~/lib/analysis/measurands';

// Element names and symbols: the ASTM D5185 element set (PRODUCT.md's measurand list).
const NAMES: Array<[string, string]> = [
  ['Iron', 'Fe'],
  ['Aluminum', 'Al'],
  ['Aluminium', 'Al'],
  ['Silicon', 'Si'],
  ['Sodium', 'Na'],
  ['Potassium', 'K'],
  ['Boron', 'B'],
  ['Molybdenum', 'Mo'],
  ['Zinc', 'Zn'],
  ['Phosphorus', 'P'],
  ['Calcium', 'Ca'],
  ['Magnesium', 'Mg'],
  ['Barium', 'Ba'],
  ['Sulfur', 'S'],
  ['Sulphur', 'S'],
  ['Copper', 'Cu'],
  ['Lead', 'Pb'],
  ['Tin', 'Sn'],
  ['Nickel', 'Ni'],
  ['Silver', 'Ag'],
  ['Titanium', 'Ti'],
  ['Vanadium', 'V'],
  ['Manganese', 'Mn'],
  ['Chromium', 'Cr'],
];

describe('recogniseHeader: elements', () => {
  test.each(ELEMENT_CODES.flatMap((code) => [code, code.toUpperCase(), code.toLowerCase()].map((h) => [h, code])))(
    'symbol %j → %s',
    (header, code) => {
      expect(recogniseHeader(header)).toEqual({ kind: 'measurand', code, unit: 'ppm' });
    },
  );
  test.each(
    NAMES.flatMap(([name, code]) => [
      [name, code],
      [name.toUpperCase(), code],
      [`${name} (${code})`, code],
      [`${code} (${name})`, code],
    ]),
  )('name %j → %s', (header, code) => {
    expect(recogniseHeader(header)).toEqual({ kind: 'measurand', code, unit: 'ppm' });
  });
  test.each([
    ['Fe ppm', 'Fe', 'ppm'],
    ['Fe [mg/kg]', 'Fe', 'ppm'],
    ['FE_PPM', 'Fe', 'ppm'],
    ['Iron, ppm', 'Fe', 'ppm'],
    ['Cu (µg/g)', 'Cu', 'ppm'],
    ['ICP Iron', 'Fe', 'ppm'],
    ['Sulfur %', 'S', '%'],
    ['Si ppm', 'Si', 'ppm'],
  ])('with unit %j → %s in %s', (header, code, unit) => {
    expect(recogniseHeader(header)).toEqual({ kind: 'measurand', code, unit });
  });
  test('a units-row cell supplies the unit', () => {
    expect(recogniseHeader('Sulphur (S)', '%')).toEqual({ kind: 'measurand', code: 'S', unit: '%' });
  });
});

describe('recogniseHeader: oil condition', () => {
  test.each([
    ['KV40', 'KV40', 'mm²/s'],
    ['KV100', 'KV100', 'mm²/s'],
    ['kv 40', 'KV40', 'mm²/s'],
    ['Visc 40C', 'KV40', 'mm²/s'],
    ['Vis 100 °C', 'KV100', 'mm²/s'],
    ['Viscosity @ 100 °C (cSt)', 'KV100', 'mm²/s'],
    ['Viscosity 40 °C (mm²/s)', 'KV40', 'mm²/s'],
    ['Kinematic viscosity at 40 deg C, mm2/s', 'KV40', 'mm²/s'],
    ['V100', 'KV100', 'mm²/s'],
    ['Visc 212F', 'KV100', 'mm²/s'],
    ['Visc 210F SUS', 'SUS210', 'SUS'],
    ['SUS 210 °F', 'SUS210', 'SUS'],
    ['SUS210', 'SUS210', 'SUS'],
    ['Saybolt Universal Seconds @ 210 °F', 'SUS210', 'SUS'],
    ['TBN', 'TBN', 'mg KOH/g'],
    ['Base Number (mg KOH/g)', 'TBN', 'mg KOH/g'],
    ['TAN', 'TAN', 'mg KOH/g'],
    ['Acid number', 'TAN', 'mg KOH/g'],
    ['Fuel %', 'FUEL', '%'],
    ['Fuel dilution', 'FUEL', '%'],
    ['Water %', 'WATER', '%'],
    ['Water (ppm)', 'WATER', 'ppm'],
    ['H2O', 'WATER', '%'],
    ['Flash Point', 'FLASH', '°C'],
    ['Flash Point (°F)', 'FLASH', '°F'],
    ['Insolubles %', 'INSOL', '%'],
    ['Oxidation (abs/cm)', 'OXI', undefined],
    ['Nitration', 'NIT', undefined],
    ['Pentane insolubles', 'INSOL', '%'],
  ])('%j → %s in %s', (header, code, unit) => {
    expect(recogniseHeader(header)).toEqual({ kind: 'measurand', code, unit });
  });
  test.each([['VI'], ['Viscosity Index'], ['Visc. index']])('%j → VI', (header) => {
    expect(recogniseHeader(header)).toEqual({ kind: 'measurand', code: 'VI' });
  });
  test.each([['Glycol'], ['Coolant'], ['Glycol test'], ['Antifreeze']])('%j → GLYCOL', (header) => {
    expect(recogniseHeader(header)).toEqual({ kind: 'measurand', code: 'GLYCOL' });
  });
  test.each([['Viscosity'], ['Visc 60C'], ['SUS 100F'], ['SUS']])('%j is unknown, with a note', (header) => {
    const result = recogniseHeader(header);
    expect(result.kind).toBe('unknown');
    expect(result.note).toBeTruthy();
  });
});

describe('recogniseHeader: bottle code and dates', () => {
  test.each([
    ['Bottle', 'bottle'],
    ['Bottle code', 'bottle'],
    ['Bottle No', 'bottle'],
    ['Kit #', 'bottle'],
    ['Sample ID', 'bottle'],
    ['Sample number', 'bottle'],
    ['Bottle tag', 'bottle'],
    ['Sampled', 'sampled'],
    ['Sample date', 'sampled'],
    ['Date sampled', 'sampled'],
    ['Date Drawn', 'sampled'],
    ['Reported', 'reported'],
    ['Report date', 'reported'],
    ['Date reported', 'reported'],
    ['Date completed', 'reported'],
    ['Date', 'unknown'],
    ['Date received', 'unknown'],
    ['Machine', 'unknown'],
    ['Notes', 'unknown'],
    ['Lab No', 'unknown'],
    ['Fe Cu', 'unknown'],
    ['Iron (Cu)', 'unknown'],
    ['', 'unknown'],
  ])('%j → %s', (header, kind) => {
    expect(recogniseHeader(header).kind).toBe(kind);
  });
});

describe('isUnitCell', () => {
  test.each([
    ['ppm', true],
    ['mg/kg', true],
    ['cSt', true],
    ['mm²/s', true],
    ['SUS', true],
    ['%', true],
    ['°F', true],
    ['mg KOH/g', true],
    ['cSt @ 40 °C', true],
    ['SW-1041', false],
    ['12', false],
    ['Iron', false],
    ['', false],
  ])('%j → %s', (cell, expected) => {
    expect(isUnitCell(cell)).toBe(expected);
  });
});
