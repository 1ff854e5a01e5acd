// terminalText, the one rule for untrusted text on a terminal: every character the Unicode Character
// Database files as Cc (controls), Cf (format: bidi overrides and isolates, zero-width characters, the
// byte-order mark, tag characters), Zl or Zp is shown as an escape, judged here by the JavaScript
// engine's own Unicode property tables over every code point; letters of any script pass unchanged. And
// no other module of src/ keeps an escaping rule of its own.

import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { terminalText } from '../../src/common/terminalText.js';

const UNSEEN = /[\p{Cc}\p{Cf}\p{Zl}\p{Zp}\p{Cs}]/u; // the engine's tables, outside the project

describe('terminalText', () => {
  it('shows the right-to-left override and the other format characters as escapes', () => {
    // [C] Unicode Character Database (UnicodeData.txt): U+202E RIGHT-TO-LEFT OVERRIDE, U+2066 LEFT-TO-RIGHT
    // ISOLATE, U+200B ZERO WIDTH SPACE, U+FEFF ZERO WIDTH NO-BREAK SPACE and U+E0041 TAG LATIN CAPITAL
    // LETTER A are general category Cf; U+001B ESCAPE and U+0085 NEXT LINE are Cc; U+2028 is Zl
    expect(terminalText('Mill\u202eenaL')).toBe('Mill\\u202eenaL');
    expect(terminalText('\u2066a\u200bb\ufeffc\u{E0041}')).toBe('\\u2066a\\u200bb\\ufeffc\\u{e0041}');
    expect(terminalText('\u001b[2J\u0085\u2028')).toBe('\\u001b[2J\\u0085\\u2028');
    expect(terminalText('half \ud800 a surrogate')).toBe('half \\ud800 a surrogate');
  });

  it('leaves letters, digits and spaces of any script as they were', () => {
    expect(terminalText('Brückenstraße 東口 Øst – «Kai» ١٢٣')).toBe('Brückenstraße 東口 Øst – «Kai» ١٢٣');
  });

  it('leaves no unseen character anywhere in the Unicode range, and keeps every other one', () => {
    const kept: number[] = [];
    for (let cp = 0; cp <= 0x10ffff; cp += cp < 0x30000 ? 1 : 0x101) {
      if (cp >= 0xd800 && cp <= 0xdfff) continue; // lone halves are checked above
      const c = String.fromCodePoint(cp);
      const out = terminalText(c);
      if (UNSEEN.test(c)) expect(UNSEEN.test(out), `U+${cp.toString(16)}`).toBe(false);
      else if (out !== c) kept.push(cp);
    }
    expect(kept).toEqual([]);
  });
});

describe('one escaping rule in the code', () => {
  it('no module but terminalText.ts writes its own pattern of control characters', () => {
    const SRC = join(import.meta.dirname, '..', '..', 'src');
    const files = (d: string): string[] =>
      readdirSync(d, { withFileTypes: true }).flatMap((e) =>
        e.isDirectory() ? files(join(d, e.name)) : e.name.endsWith('.ts') ? [join(d, e.name)] : [],
      );
    const own = files(SRC).filter(
      (f) => !f.endsWith('terminalText.ts') && /\\u007f-\\u009f|\\x7f-\\x9f|\\p\{Cc\}/.test(readFileSync(f, 'utf8')),
    );
    expect(own.map((f) => f.slice(SRC.length + 1))).toEqual([]);
  });
});
