// The one-line error is printed to a terminal, and it can quote feed text (a value, a table name, a path).
// Whatever bytes the feed holds, the line stays one line and carries no control characters: no C0 or C1
// controls (Unicode general category Cc, which includes ESC and NEL) and no line or paragraph separators
// (Zl, Zp), judged by the JavaScript engine's own Unicode property tables. Checked on StopspanError.oneLine
// and through the built CLI on a feed whose stop_times.txt names a stop id made of such characters.

import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { StopspanError } from '../../src/common/errors.js';
import { ROOT } from '../fuzz/demoTables.js';
import { CLI } from '../helpers/cli.js';

const UNSAFE = /[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u; // Unicode Cc, Cf, Zl, Zp (the engine's tables, outside the project)
// ESC sequences that retitle a window and clear a screen, a BEL, NEL (U+0085), CSI as one C1 byte, DEL,
// the line and paragraph separators, and the right-to-left override and a zero-width space (Cf)
const NASTY = '\u001b]0;pwned\u0007\u001b[2JS9\u0085\u009b31m\u007f\u2028X\u2029Y\u202eZ\u200b';

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

describe('the one-line error', () => {
  it('escapes control characters and separators wherever they come from', () => {
    const e = new StopspanError('bad-value', `stop_id ${NASTY} is odd\r\nreally`, {
      file: `feed${NASTY}.zip`,
      line: 4,
      column: 'stop_id',
      value: NASTY,
    });
    const line = e.oneLine();
    expect(UNSAFE.test(line), JSON.stringify(line)).toBe(false);
    expect(line).toContain('\\u001b]0;pwned\\u0007'); // shown, not dropped: a person can still see what was there
    expect(line).toContain('\\u0085');
    expect(line).toContain('\\u2028');
    expect(line).toContain('\\u202e'); // [C] Unicode Character Database: U+202E RIGHT-TO-LEFT OVERRIDE is Cf
    expect(line.startsWith(`feed\\u001b]0;pwned`)).toBe(true);
  });

  it('leaves ordinary text, non-ASCII letters included, as it was', () => {
    const e = new StopspanError('bad-value', 'stop_lat is not a number', {
      file: 'stops.txt',
      line: 3,
      column: 'stop_lat',
      value: 'Brückenstraße 東口',
    });
    expect(e.oneLine()).toBe('stops.txt:3 column stop_lat: stop_lat is not a number (got "Brückenstraße 東口")');
  });

  it.skipIf(!existsSync(CLI))('through the built CLI: exit 2, one line, no control characters on stderr', () => {
    const feed = mkdtempSync(join(tmpdir(), 'stopspan-errline-'));
    made.push(feed);
    cpSync(join(ROOT, 'fixtures', 'broken', 'minimal'), feed, { recursive: true });
    const st = readFileSync(join(feed, 'stop_times.txt'), 'utf8').split('\n');
    st[3] = st[3].replace(',S3,', `,"${NASTY}",`); // line 4 names a stop that stops.txt lacks
    writeFileSync(join(feed, 'stop_times.txt'), st.join('\n'));
    const r = spawnSync(process.execPath, [CLI, 'audit', feed, '--out', join(feed, 'out')], { encoding: 'utf8', timeout: 60_000 });
    expect(r.status, r.stderr).toBe(2);
    expect(r.stderr.endsWith('\n')).toBe(true);
    const body = r.stderr.slice(0, -1);
    expect(UNSAFE.test(body), JSON.stringify(body)).toBe(false);
    expect(body).toMatch(/^error: stop_times\.txt:4 column stop_id: /);
    expect(existsSync(join(feed, 'out'))).toBe(false);
  });
});
