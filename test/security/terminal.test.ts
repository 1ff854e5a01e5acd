// Feed text reaches the terminal through the commands' plain-text output (feed version, ids in findings,
// names in comparisons). A feed carrying terminal escape sequences (ESC ... BEL retitles a window, ESC [2J
// clears the screen), C1 controls (NEL) and format characters (the right-to-left override U+202E, which
// redraws the rest of a line backwards; zero-width spaces) must not get them through: every line the built
// CLI prints for audit, check, compare and history is free of Unicode Cc and Cf characters (judged by the
// JavaScript engine's Unicode property tables), newline excepted. (U+2028 LINE SEPARATOR, which terminals draw as a blank, is in the
// feed too; only the one-line error promises to escape it, see error-line.test.ts.)

import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT } from '../fuzz/demoTables.js';
import { CLI } from '../helpers/cli.js';

const UNSAFE = /[\p{Cc}\p{Cf}]/u;
const RLO = '\u202e'; // [C] Unicode Character Database: RIGHT-TO-LEFT OVERRIDE, general category Cf
const ESC_TITLE = '\u001b]0;pwned\u0007';
const ESC_CLEAR = '\u001b[2J';
const NEL = '\u0085';
const LS = '\u2028';

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

const q = (s: string) => `"${s.replace(/"/g, '""')}"`;

/** The minimal feed with escape sequences in feed_info, agency, a stop name, a route name and a trip id
 * (that trip also loses its shape, so check reports it by id). */
function escapeFeed(): string {
  const dir = mkdtempSync(join(tmpdir(), 'stopspan-term-'));
  made.push(dir);
  const feed = join(dir, 'feed');
  cpSync(join(ROOT, 'fixtures', 'broken', 'minimal'), feed, { recursive: true });
  const edit = (f: string, fn: (s: string) => string) => writeFileSync(join(feed, f), fn(readFileSync(join(feed, f), 'utf8')));
  writeFileSync(
    join(feed, 'feed_info.txt'),
    `feed_publisher_name,feed_publisher_url,feed_lang,feed_version\n${q(`Vellmoor${ESC_CLEAR}`)},https://transit.vellmoor.example/,en,${q(`2026.11${ESC_TITLE}${NEL}${LS}${RLO}`)}\n`,
  );
  edit('agency.txt', (s) => s.replace('Vellmoor Transit Authority', `Vellmoor${ESC_TITLE} Transit`));
  edit('stops.txt', (s) => s.replace('Mill Ln / Stop 2', `Mill${ESC_CLEAR} Ln${LS}2`).replace('Mill Ln / Stop 3', `Mill${RLO}3 potS`));
  edit('routes.txt', (s) => s.replace('Mill Lane', `Mill${NEL}Lane${ESC_CLEAR}`));
  const trip = `M1-2${ESC_TITLE}`;
  edit('trips.txt', (s) => s.replace('M1,WKDY,M1-2,0,SH1', `M1,WKDY,${q(trip)},0,`));
  edit('stop_times.txt', (s) => s.replace(/^M1-2,/gm, `${q(trip)},`));
  return feed;
}

function expectClean(label: string, text: string): void {
  const bad = text.split('\n').filter((l) => UNSAFE.test(l));
  expect(bad, `${label} printed control characters: ${JSON.stringify(bad)}`).toEqual([]);
}

describe.skipIf(!existsSync(CLI))('escape sequences in feed text never reach the terminal (built CLI)', () => {
  it('the feed really carries them, and the tool reads it', () => {
    const feed = escapeFeed();
    expect(UNSAFE.test(readFileSync(join(feed, 'feed_info.txt'), 'utf8'))).toBe(true);
    const r = spawnSync(process.execPath, [CLI, 'audit', feed, '--out', join(feed, '..', 'out')], { encoding: 'utf8', timeout: 60_000 });
    expect(r.status, r.stderr).toBe(0);
    expectClean('audit', r.stdout + r.stderr);
  });

  it('check: the feed version and the shapeless trip id are shown escaped', () => {
    const feed = escapeFeed();
    const r = spawnSync(process.execPath, [CLI, 'check', feed], { encoding: 'utf8', timeout: 60_000 });
    expect([0, 1], r.stderr).toContain(r.status);
    expectClean('check', r.stdout + r.stderr);
    expect(r.stdout).toContain('2026.11\\u001b]0;pwned\\u0007'); // shown, not dropped
    expect(r.stdout).toContain('M1-2\\u001b]0;pwned\\u0007');
  });

  it('compare: versions, names and ids are shown escaped', () => {
    const a = escapeFeed();
    const b = escapeFeed();
    const s = readFileSync(join(b, 'stops.txt'), 'utf8')
      .replace(`Mill${ESC_CLEAR} Ln${LS}2`, `Renamed${ESC_TITLE}`)
      .replace(`Mill${RLO}3 potS`, `Re${RLO}named\u200b3`);
    writeFileSync(join(b, 'stops.txt'), s);
    const r = spawnSync(process.execPath, [CLI, 'compare', a, b], { encoding: 'utf8', timeout: 60_000 });
    expect([0, 1], r.stderr).toContain(r.status);
    expectClean('compare', r.stdout + r.stderr);
    expect(r.stdout).toContain('Re\\u202enamed\\u200b3'); // the renamed stop, its format characters shown
  });

  it('history: the recorded feed version is shown escaped', () => {
    const feed = escapeFeed();
    const db = join(feed, '..', 'runs.sqlite');
    const a = spawnSync(process.execPath, [CLI, 'audit', feed, '--out', join(feed, '..', 'out-h'), '--history', db, '-q'], {
      encoding: 'utf8',
      timeout: 60_000,
    });
    expect(a.status, a.stderr).toBe(0);
    const r = spawnSync(process.execPath, [CLI, 'history', db], { encoding: 'utf8', timeout: 60_000 });
    expect(r.status, r.stderr).toBe(0);
    expectClean('history', r.stdout + r.stderr);
    expect(r.stdout).toContain('2026.11\\u001b]0;pwned\\u0007');
  });
});
