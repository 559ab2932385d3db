import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  CODE_ALPHABET,
  ISSUED_DATA_LENGTH,
  computeCheckSymbol,
  explainIssuedCode,
  formatIssuedCode,
  generateIssuedCode,
  hasValidCheckSymbol,
  normaliseBottleCode,
} from '~/lib/samples/bottle-code';

const A = CODE_ALPHABET;

describe('normaliseBottleCode', () => {
  test.each([
    { raw: 'ab-12 c', expected: 'AB12C' },
    { raw: '  K7M-Q4XH ', expected: 'K7MQ4XH' },
    { raw: 'lab 2024/0077', expected: 'LAB20240077' },
    { raw: 'x_y.z', expected: 'XYZ' },
    // The lab file reader's separators, now the same normal form: Unicode hyphen U+2010, en dash U+2013, em
    // dash U+2014, minus sign U+2212, middle dot, and a no-break space (white space to \s).
    { raw: 'SW\u20102001', expected: 'SW2001' },
    { raw: 'SW\u20132001', expected: 'SW2001' },
    { raw: 'sw\u20142001', expected: 'SW2001' },
    { raw: 'SW\u22122001', expected: 'SW2001' },
    { raw: 'SW·20·01', expected: 'SW2001' },
    { raw: 'SW\u00a02001', expected: 'SW2001' },
    // Characters that are not separators stay: letters with diacritics upper-case, '#' and '+' are kept.
    { raw: 'é#1+2', expected: 'É#1+2' },
    { raw: '', expected: '' },
  ])('"$raw" → $expected', ({ raw, expected }) => {
    expect(normaliseBottleCode(raw)).toBe(expected);
  });
});

describe('the alphabet avoids misread symbols', () => {
  test.each(['I', 'L', 'O', 'U', '0', '1', 'Z'])('%s is not used', (ch) => {
    expect(A.includes(ch)).toBe(false);
  });
  test('29 distinct symbols, so a prime modulus of 29 covers every value', () => {
    expect(new Set(A).size).toBe(29);
  });
});

/** Every code of `length` data symbols, as strings. */
function* allCodes(length: number): Generator<string> {
  const idx = new Array<number>(length).fill(0);
  while (true) {
    yield idx.map((i) => A[i]).join('');
    let k = length - 1;
    while (k >= 0 && ++idx[k]! === A.length) idx[k--] = 0;
    if (k < 0) return;
  }
}

describe('check symbol catches every single substitution and every adjacent swap', () => {
  // Exhaustive over every 3-symbol code (29³ = 24,389 codes, each with its check symbol): every one of the
  // 4 × 28 single substitutions and every swap of two different neighbours must fail the check.
  test('exhaustive for all codes of 3 data symbols + check', () => {
    let substitutions = 0;
    let swaps = 0;
    for (const data of allCodes(3)) {
      const code = data + computeCheckSymbol(data);
      expect(hasValidCheckSymbol(code)).toBe(true);
      for (let p = 0; p < code.length; p++) {
        for (const s of A) {
          if (s === code[p]) continue;
          const typo = code.slice(0, p) + s + code.slice(p + 1);
          if (hasValidCheckSymbol(typo)) throw new Error(`substitution not caught: ${code} → ${typo}`);
          substitutions++;
        }
        if (p + 1 < code.length && code[p] !== code[p + 1]) {
          const swapped = code.slice(0, p) + code[p + 1] + code[p] + code.slice(p + 2);
          if (hasValidCheckSymbol(swapped)) throw new Error(`swap not caught: ${code} → ${swapped}`);
          swaps++;
        }
      }
    }
    expect(substitutions).toBe(24_389 * 4 * 28);
    expect(swaps).toBeGreaterThan(24_389 * 3 * 0.8);
  });

  // At the issued length the sum is linear in each symbol, so whether an error is caught depends only on
  // its position and the two symbols involved. Every (position, old, new) and every (position, a, b) is
  // enumerated, each inside a different random remainder of the code.
  test('exhaustive over positions and symbol pairs at the issued length (6 + check)', () => {
    const rnd = fc.sample(fc.array(fc.integer({ min: 0, max: 28 }), { minLength: 7, maxLength: 7 }), 30 * 29 * 29);
    let r = 0;
    let checked = 0;
    for (let p = 0; p < ISSUED_DATA_LENGTH + 1; p++) {
      for (const a of A) {
        for (const b of A) {
          if (a === b) continue;
          const body = rnd[r++ % rnd.length]!.slice(0, ISSUED_DATA_LENGTH)
            .map((i) => A[i])
            .join('');
          // Substitution at p: put a at p in valid code, then replace by b.
          if (p < ISSUED_DATA_LENGTH) {
            const data = body.slice(0, p) + a + body.slice(p + 1);
            const code = data + computeCheckSymbol(data);
            expect(hasValidCheckSymbol(code.slice(0, p) + b + code.slice(p + 1))).toBe(false);
            // Adjacent swap of positions p, p + 1 holding a and b (p + 1 may be the check symbol).
            if (p + 1 < ISSUED_DATA_LENGTH) {
              const d2 = data.slice(0, p + 1) + b + data.slice(p + 2);
              const c2 = d2 + computeCheckSymbol(d2);
              expect(hasValidCheckSymbol(c2.slice(0, p) + c2[p + 1] + c2[p] + c2.slice(p + 2))).toBe(false);
            }
          } else {
            const code = body + computeCheckSymbol(body);
            if (code[p] === a) expect(hasValidCheckSymbol(code.slice(0, p) + b)).toBe(false);
          }
          checked++;
        }
      }
    }
    expect(checked).toBe(7 * 29 * 28);
  });

  test('swapping the last data symbol with a different check symbol is caught', () => {
    for (const data of allCodes(2)) {
      const code = data + computeCheckSymbol(data);
      if (code[1] === code[2]) continue;
      expect(hasValidCheckSymbol(code[0]! + code[2]! + code[1]!)).toBe(false);
    }
  });
});

describe('issued codes', () => {
  test('generated codes are 7 symbols and pass their check', () => {
    for (let i = 0; i < 200; i++) {
      const code = generateIssuedCode();
      expect(code).toHaveLength(7);
      expect(explainIssuedCode(code)).toBeNull();
    }
  });

  test.each([
    { input: 'K7MQ4X', reason: /has 7 characters/ },
    { input: 'K7MQ4XOO', reason: /has 7 characters/ },
    { input: 'K7MQ4X0', reason: /never contains 0/ },
  ])('$input is refused', ({ input, reason }) => {
    expect(explainIssuedCode(input)).toMatch(reason);
  });

  test('a mistyped character in a real code is refused with a clear reason', () => {
    const code = generateIssuedCode(() => 5); // "777777?" with a fixed source
    const typo = (code[0] === 'A' ? 'B' : 'A') + code.slice(1);
    expect(explainIssuedCode(formatIssuedCode(code))).toBeNull();
    expect(explainIssuedCode(typo)).toMatch(/fails its check character/);
  });

  test('grouping for print', () => {
    expect(formatIssuedCode('K7MQ4XH')).toBe('K7M-Q4XH');
  });
});
