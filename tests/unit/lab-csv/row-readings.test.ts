import { describe, expect, test } from 'vitest';
import { parseLabCsv, type LabCsvRow } from '~/lib/lab-csv/lab-csv';

/**
 * A row whose every measurand column holds a reading gets its readings object by copying a per-file template; any
 * other row builds it key by key. These cases hold the two ways to the same result: the same keys in the same
 * order (plan order, KV100 right after a Saybolt column), no placeholder left behind, and no object shared between
 * rows.
 */

function read(lines: readonly string[]): LabCsvRow[] {
  const result = parseLabCsv(`${lines.join('\n')}\n`);
  expect(result.errors.filter((e) => e.severity === 'error')).toEqual([]);
  return result.rows;
}

describe('row readings', () => {
  const cases: { name: string; lines: string[]; keys: string[][]; values: (number | undefined)[][] }[] = [
    {
      name: 'every column filled, then one blank, then the first blank',
      lines: ['Bottle,Fe,Cu,Si,TBN', 'A-1,12,3,8,7.5', 'A-2,14,,9,7.1', 'A-3,,4,10,6.8'],
      keys: [
        ['Fe', 'Cu', 'Si', 'TBN'],
        ['Fe', 'Si', 'TBN'],
        ['Cu', 'Si', 'TBN'],
      ],
      values: [
        [12, 3, 8, 7.5],
        [14, 9, 7.1],
        [4, 10, 6.8],
      ],
    },
    {
      name: 'columns in another order keep the file order',
      lines: ['Bottle,TBN,Si,Fe', 'B-1,7.5,<1,ND', 'B-2,7.4,2,>999'],
      keys: [
        ['TBN', 'Si', 'Fe'],
        ['TBN', 'Si', 'Fe'],
      ],
      values: [
        [7.5, 1, 0],
        [7.4, 2, 999],
      ],
    },
    {
      // ASTM D2161: 58.9 SUS at 210 °F is 10.0 cSt (from the standard's table, from memory; the conversion itself is
      // checked in saybolt.test.ts). Here only the key order and presence matter.
      name: 'a Saybolt column adds KV100 right after it',
      lines: ['Bottle,Fe,SUS 210F,TBN', 'C-1,12,58.9,7.5', 'C-2,13,,7.2'],
      keys: [
        ['Fe', 'SUS210', 'KV100', 'TBN'],
        ['Fe', 'TBN'],
      ],
      values: [
        [12, 58.9, undefined, 7.5],
        [13, 7.2],
      ],
    },
    {
      name: 'a problem cell leaves its key out, like a blank one',
      lines: ['Bottle,Fe,Cu', 'D-1,12,3', 'D-2,12,=1+1', 'D-3,12,3'],
      keys: [['Fe', 'Cu'], ['Fe'], ['Fe', 'Cu']],
      values: [[12, 3], [12], [12, 3]],
    },
  ];

  test.each(cases)('$name', ({ lines, keys, values }) => {
    const result = parseLabCsv(`${lines.join('\n')}\n`);
    const rows = result.rows;
    expect(rows.map((row) => Object.keys(row.readings))).toEqual(keys);
    rows.forEach((row, r) => {
      Object.values(row.readings).forEach((reading, k) => {
        expect(reading).toBeDefined();
        const expected = values[r]![k];
        if (expected !== undefined) expect(reading!.value).toBe(expected);
      });
    });
  });

  test('no two rows share a readings object, and changing one leaves the next alone', () => {
    const rows = read(['Bottle,Fe,Cu', 'E-1,12,3', 'E-2,12,3', 'E-3,12,3']);
    const [first, second, third] = rows.map((row) => row.readings);
    expect(first).not.toBe(second);
    expect(second).not.toBe(third);
    delete first!.Fe;
    first!.Cu = { value: 99 };
    expect(second).toEqual({ Fe: { value: 12 }, Cu: { value: 3 } });
    expect(Object.keys(third!)).toEqual(['Fe', 'Cu']);
  });

  test('a file read after another starts from its own columns', () => {
    read(['Bottle,Fe,Cu,Si', 'F-1,1,2,3']);
    const rows = read(['Bottle,Pb,Sn', 'G-1,4,5']);
    expect(rows[0]!.readings).toEqual({ Pb: { value: 4 }, Sn: { value: 5 } });
  });
});
