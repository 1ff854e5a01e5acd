// Numbers typed on the command line or written in a parameters or scenario file are read by the same
// decimal rule as the feed (parseDecimal): "0x10" is not 16 anywhere ([C] ECMA-262 StringToNumber would
// read it as 16, which is why Number() is not used on them).

import { describe, expect, it } from 'vitest';
import { numberOption } from '../../src/cli/shared.js';
import { paramOverrides } from '../../src/cli/paramOptions.js';
import { parseScenario } from '../../src/whatif/whatif.js';
import { normalizeParams } from '../../src/model/params.js';
import { thrown } from '../helpers/errors.js';

describe('decimal numbers in options and parameter files', () => {
  it('a numeric option: decimal read, hexadecimal and binary refused naming the option', () => {
    expect(numberOption('--twin-stop-m', '12.5')).toBe(12.5);
    for (const v of ['0x10', '0b10', ' ']) {
      const e = thrown(() => numberOption('--twin-stop-m', v));
      expect(e.code, v).toBe('bad-option');
      expect(e.message).toContain('--twin-stop-m');
    }
  });

  it('a model parameter from an option or a file: "0x2" stays text and is refused', () => {
    expect(paramOverrides({ walkSpeed: '1.3' })).toEqual({ walk_speed_mps: 1.3 });
    expect(paramOverrides({ walkSpeed: '0x2' })).toEqual({ walk_speed_mps: '0x2' });
    expect(thrown(() => normalizeParams({ walk_speed_mps: '0x2' })).message).toContain('walk_speed_mps');
  });

  it('a scenario coordinate written as text', () => {
    expect(parseScenario({ add: [{ lat: '52.5', lon: '13.4' }] }).add?.[0]).toMatchObject({ lat: 52.5, lon: 13.4 });
    expect(thrown(() => parseScenario({ add: [{ lat: '0x34', lon: '13.4' }] })).code).toBe('bad-scenario');
  });
});
