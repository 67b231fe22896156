/**
 * groupThousands writes integers as toLocaleString('en-US') does (reference: the JavaScript
 * engine's ECMA-402 number formatting with ICU's en-US data; exact string equality).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { formatNumber, groupThousands } from '../../src/render/format.js';

describe('groupThousands equals toLocaleString("en-US") (exact)', () => {
  test('every integer magnitude the tables use (|n| < 1e7) and beyond', () => {
    fc.assert(
      fc.property(fc.integer({ min: -99_999_999, max: 99_999_999 }), (n) => {
        expect(groupThousands(n)).toBe(n.toLocaleString('en-US'));
      }),
      { numRuns: 2000 },
    );
  });
  test.each([0, 999, 1000, -1000, 9999, 10000, 999999, 1000000, -1234567, 9999999])('%s', (n) => {
    expect(groupThousands(n)).toBe(n.toLocaleString('en-US'));
  });
  test('formatNumber between 1000 and 1e7 is the rounded integer as en-US writes it', () => {
    fc.assert(
      fc.property(fc.double({ min: 1000, max: 9_999_999, noNaN: true }), fc.boolean(), (x, neg) => {
        const v = neg ? -x : x;
        expect(formatNumber(v)).toBe(Math.round(v).toLocaleString('en-US'));
      }),
      { numRuns: 2000 },
    );
  });
});
