import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  KM_PER_MI,
  MM_PER_IN,
  convertKmTo,
  formatLength,
  formatMeter,
  fromCelsius,
  fromMillimetres,
  fromStoredMeter,
  toCelsius,
  toMillimetres,
  toStoredMeter,
} from '~/lib/units/units';

describe('exact conversion factors', () => {
  test.each([
    // NIST SP 811 (2008), Appendix B.8: inch = 2.54 E-02 m exactly; mile (international) = 1.609344 E+03 m exactly.
    { name: 'mm per inch', value: MM_PER_IN, expected: 25.4 },
    { name: 'km per mile', value: KM_PER_MI, expected: 1.609344 },
  ])('$name is $expected', ({ value, expected }) => {
    expect(value).toBe(expected);
  });
});

describe('conversions at the edges', () => {
  test.each([
    // NIST SP 811 B.8 (exact factors): 1 mi = 1.609344 km, 1 in = 25.4 mm.
    { what: '1 mi in km', got: () => toStoredMeter(1, 'mi'), expected: 1.609344 },
    { what: '10,000 mi in km', got: () => toStoredMeter(10_000, 'mi'), expected: 16_093.44 },
    { what: 'km stay km', got: () => toStoredMeter(1234.5, 'km'), expected: 1234.5 },
    { what: 'hours stay hours', got: () => toStoredMeter(87.3, 'h'), expected: 87.3 },
    { what: '16,093.44 km in mi', got: () => fromStoredMeter(16_093.44, 'mi'), expected: 10_000 },
    { what: '100 km in mi', got: () => convertKmTo(100, 'mi'), expected: 62.137119223733 },
    { what: '1 in in mm', got: () => toMillimetres(1, 'in'), expected: 25.4 },
    { what: '0.100 in in mm', got: () => toMillimetres(0.1, 'in'), expected: 2.54 },
    { what: '3.00 mm in in', got: () => fromMillimetres(3, 'in'), expected: 0.11811023622 },
    // NIST SP 811 B.9: t/°C = (t/°F − 32)/1.8; water freezes at 32 °F, −40 is the crossing point.
    { what: '32 °F in °C', got: () => toCelsius(32, 'F'), expected: 0 },
    { what: '212 °F in °C', got: () => toCelsius(212, 'F'), expected: 100 },
    { what: '−40 °F in °C', got: () => toCelsius(-40, 'F'), expected: -40 },
    { what: '40 °C in °F', got: () => fromCelsius(40, 'F'), expected: 104 },
  ])('$what = $expected', ({ got, expected }) => {
    expect(got()).toBeCloseTo(expected, 9);
  });

  test('round trips lose nothing meaningful', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1e6, noNaN: true }), (v) => {
        expect(fromStoredMeter(toStoredMeter(v, 'mi'), 'mi')).toBeCloseTo(v, 6);
        expect(fromMillimetres(toMillimetres(v, 'in'), 'in')).toBeCloseTo(v, 6);
        expect(toCelsius(fromCelsius(v, 'F'), 'F')).toBeCloseTo(v, 6);
      }),
    );
  });

  test.each([
    { stored: 16_093.44, meter: 'mi' as const, expected: '10,000 mi' },
    { stored: 5230, meter: 'km' as const, expected: '5,230 km' },
    { stored: 87.25, meter: 'h' as const, expected: '87.3 h' },
  ])('formatMeter($stored, $meter) = $expected', ({ stored, meter, expected }) => {
    expect(formatMeter(stored, meter)).toBe(expected);
  });

  // ECMA-402 defines Number.prototype.toLocaleString(locales, options) as formatting with a new
  // Intl.NumberFormat(locales, options): the formats made once must give exactly what that gives.
  test('formatMeter matches toLocaleString with the same options, for any reading and unit', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e8, noNaN: true }),
        fc.constantFrom('km' as const, 'mi' as const, 'h' as const),
        (stored, meter) => {
          const digits = meter === 'h' ? 1 : 0;
          const v = fromStoredMeter(stored, meter);
          const reference = v.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: 0 });
          expect(formatMeter(stored, meter)).toBe(`${reference} ${meter}`);
        },
      ),
    );
  });

  test.each([
    { mm: 2.54, unit: 'in' as const, expected: '0.100 in' },
    { mm: 2.54, unit: 'mm' as const, expected: '2.54 mm' },
  ])('formatLength($mm, $unit) = $expected', ({ mm, unit, expected }) => {
    expect(formatLength(mm, unit)).toBe(expected);
  });
});
