// The one error handler at the command boundary (src/cli/shared.ts): a known failure is one line and
// exit 2, the engine refusing an allocation (input past every cap) is one line and exit 2 as well, and
// anything else is an internal error, exit 3, never a stack trace unless asked for.

import { afterEach, describe, expect, it, vi } from 'vitest';
import { StopspanError } from '../../src/common/errors.js';
import { EXIT, runAction } from '../../src/cli/shared.js';

async function run(fail: () => never): Promise<{ code: number | string | undefined; err: string }> {
  let err = '';
  const spy = vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => {
    err += String(s);
    return true;
  });
  const before = process.exitCode;
  try {
    await runAction(false, async () => fail());
    return { code: process.exitCode, err };
  } finally {
    spy.mockRestore();
    process.exitCode = before;
  }
}

afterEach(() => vi.restoreAllMocks());

describe('runAction', () => {
  it('turns the engine refusing a string or buffer into one line and exit 2', async () => {
    // the messages V8 and Node give when a string or ArrayBuffer cannot be made [M]
    for (const msg of [
      'Invalid string length',
      'Array buffer allocation failed',
      'Invalid typed array length: 9999999999999',
      'Invalid array length',
    ]) {
      const r = await run(() => {
        throw new RangeError(msg);
      });
      expect(r.code, msg).toBe(EXIT.badInput);
      expect(r.err.trimEnd().split('\n'), msg).toHaveLength(1);
      expect(r.err).toMatch(/^error: .*too large.*feed-too-large/);
    }
  });

  it('makes a real oversized string exit 2, as a feed past the caps would', async () => {
    const r = await run(() => {
      const s = 'x'.repeat(1 << 28);
      throw new Error(String(s + s + s)); // past V8's string length limit (about 2^29 characters)
    });
    expect(r.code).toBe(EXIT.badInput);
  });

  it('keeps other failures internal (exit 3) and known ones exit 2', async () => {
    const other = await run(() => {
      throw new RangeError('Maximum call stack size exceeded');
    });
    expect(other.code).toBe(EXIT.internal);
    expect(other.err).toMatch(/^internal error/);
    const known = await run(() => {
      throw new StopspanError('feed-too-large', 'too big', { file: 'stops.txt' });
    });
    expect(known.code).toBe(EXIT.badInput);
    expect(known.err).toBe('error: stops.txt: too big\n');
  });
});
