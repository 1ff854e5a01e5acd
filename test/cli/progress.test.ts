// The progress drawer (src/cli/shared.ts): a line redrawn in place on a terminal that takes escape codes,
// plain lines (one per stage, no escape codes) under TERM=dumb or NO_COLOR, and nothing when stderr is
// not a terminal or the run is quiet.

import { describe, expect, it } from 'vitest';
import { makeProgress, terminalTakesEscapes, type ProgressStream } from '../../src/cli/shared.js';

function sink(isTTY: boolean): ProgressStream & { text: string } {
  const s = {
    isTTY,
    columns: 80,
    text: '',
    write(t: string) {
      s.text += t;
      return true;
    },
  };
  return s;
}

/** Feeds a run's events: two stages, the first with several byte counts. */
function run(stream: ProgressStream, env: Record<string, string | undefined>, quiet = false): void {
  const { onProgress, done } = makeProgress(quiet, stream, env);
  onProgress?.({ stage: 'read stop_times.txt', done: 1e6, total: 9e6, unit: 'bytes' });
  onProgress?.({ stage: 'read stop_times.txt', done: 5e6, total: 9e6, unit: 'bytes' });
  onProgress?.({ stage: 'build patterns' });
  done();
}

// ECMA-48 control sequence introducer (ESC [) and carriage return: what a dumb terminal prints as garbage
const ESCAPES = /\x1b\[|\r/;

describe('progress on stderr', () => {
  it('redraws one line on a terminal that takes escape codes', () => {
    const s = sink(true);
    run(s, { TERM: 'xterm-256color' });
    expect(s.text).toMatch(/^\r\x1b\[2Kread stop_times\.txt: 1\.0 MB \/ 9\.0 MB/);
    expect(s.text).toContain('build patterns');
    expect(s.text.endsWith('\r\x1b[2K')).toBe(true);
  });

  it('writes a plain line per stage under TERM=dumb and under NO_COLOR (no-color.org: set and not empty)', () => {
    for (const env of [{ TERM: 'dumb' }, { TERM: 'xterm', NO_COLOR: '1' }]) {
      const s = sink(true);
      run(s, env);
      expect(s.text).not.toMatch(ESCAPES);
      expect(s.text).toBe('read stop_times.txt\nbuild patterns\n');
    }
    expect(terminalTakesEscapes({ TERM: 'xterm', NO_COLOR: '' })).toBe(true); // empty means unset
  });

  it('writes nothing when stderr is not a terminal, or when quiet', () => {
    const pipe = sink(false);
    run(pipe, { TERM: 'xterm' });
    const quiet = sink(true);
    run(quiet, { TERM: 'xterm' }, true);
    expect(pipe.text + quiet.text).toBe('');
  });
});
