import { describe, expect, test } from 'vitest';
import { computeSayboltSeconds, convertSayboltToKinematic, describeSayboltConvention } from '~/lib/lab-csv/saybolt';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';

/** ASTM D2161 equation restated independently of the module, so the tests check the module against it. */
function d2161(nu: number, tempF: number): number {
  const sus100 = 4.6324 * nu + (1 + 0.03264 * nu) / ((3930.2 + 262.7 * nu + 23.97 * nu ** 2 + 1.646 * nu ** 3) * 1e-5);
  return sus100 * (1 + 0.000061 * (tempF - 100));
}

describe('computeSayboltSeconds (ASTM D2161 equation)', () => {
  // Hand arithmetic from the D2161 equation: ν = 10 → 46.324 + 1.3264 / 0.106002 = 58.837 SUS at 100 °F;
  // at 210 °F × (1 + 0.000061 · 110) = × 1.00671 → 59.232 SUS.
  test.each([
    { nu: 10, tempF: 100, sus: 58.837 },
    { nu: 10, tempF: 210, sus: 59.232 },
  ])('ν = $nu mm²/s at $tempF °F → $sus SUS (hand-computed from the D2161 equation)', ({ nu, tempF, sus }) => {
    expect(computeSayboltSeconds(nu, tempF)).toBeCloseTo(sus, 3);
  });
});

describe('convertSayboltToKinematic inverts the D2161 equation', () => {
  // Check values: the forward D2161 equation at these viscosities (engine oils are 5–25 mm²/s at 100 °C).
  test.each([2, 3.5, 5, 8.2, 10, 12.6, 16.3, 21.9, 26.1, 50, 75, 100, 500])(
    'SUS210 from ν = %d mm²/s converts back to ν',
    (nu) => {
      const sus = d2161(nu, 210);
      expect(convertSayboltToKinematic(sus, 210)).toBeCloseTo(nu, 9);
    },
  );

  test.each([100, 122, 210])('round trip at %d °F', (tempF) => {
    expect(convertSayboltToKinematic(d2161(7.5, tempF), tempF)).toBeCloseTo(7.5, 9);
  });

  test.each([
    { sus: 31.9, why: 'below 32 SUS, where the D2161 table starts (from memory of the standard)' },
    { sus: Number.NaN, why: 'not a number' },
    { sus: Number.POSITIVE_INFINITY, why: 'infinite' },
  ])('refuses $sus: $why', ({ sus }) => {
    expect(convertSayboltToKinematic(sus, 100)).toBeNull();
  });
});

describe('describeSayboltConvention says which Saybolt convention the import assumed', () => {
  test('a file with SUS only: converted to KV100 at 210 °F', () => {
    const { columns } = parseLabCsv('Bottle,Fe,SUS 210F\nA1,12,59.2\n');
    expect(describeSayboltConvention(columns)).toMatch(/SUS at 210 °F.*inverting the ASTM D2161 equation at 210 °F/);
  });
  test('a file with both KV100 and SUS: KV100 used, SUS kept as reported', () => {
    const { columns } = parseLabCsv('Bottle,Fe,KV100,SUS 210F\nA1,12,10,59.2\n');
    expect(describeSayboltConvention(columns)).toMatch(/gives the viscosity at 100 °C directly.*not converted/);
  });
  test('no Saybolt column: nothing to say', () => {
    expect(describeSayboltConvention(parseLabCsv('Bottle,Fe\nA1,12\n').columns)).toBeNull();
  });
});
