// parseDecimal, the one reader of numbers written in feeds and data files: decimal as GTFS writes them
// ([C] GTFS Schedule reference, Field Types: Float, Integer, Latitude and Longitude are decimal numbers),
// never the hexadecimal, binary or octal forms that ECMAScript's StringToNumber also reads ([C] ECMA-262,
// StringNumericLiteral: NonDecimalIntegerLiteral), and never 0 for text of spaces.

import { describe, expect, it } from 'vitest';
import { parseDecimal } from '../../src/common/decimal.js';

describe('parseDecimal', () => {
  it('reads decimal numbers with sign, fraction and exponent, spaces around allowed', () => {
    expect(parseDecimal('40.7527')).toBe(40.7527);
    expect(parseDecimal('-73.99')).toBe(-73.99);
    expect(parseDecimal('+5')).toBe(5);
    expect(parseDecimal('.5')).toBe(0.5);
    expect(parseDecimal('5.')).toBe(5);
    expect(parseDecimal('1.2e3')).toBe(1200);
    expect(parseDecimal(' 10\t')).toBe(10);
    expect(parseDecimal('010')).toBe(10); // a leading zero is decimal, not octal
  });

  it('refuses what Number() would read as something else', () => {
    // each of these is 10, Infinity or 0 to Number() [C] ECMA-262 StringToNumber
    for (const s of [
      '0x0A',
      '0X0a',
      '0b1010',
      '0o12',
      'Infinity',
      '-Infinity',
      '',
      ' ',
      '\t',
      '1_000',
      '1,5',
      'NaN',
      '1e',
      '--1',
      '1e400',
    ]) {
      expect(parseDecimal(s), JSON.stringify(s)).toBeNull();
    }
    expect(Number('0x0A')).toBe(10); // the reason for the rule
    expect(Number(' ')).toBe(0);
  });
});
