// Through the built command: every command that writes a folder (audit, whatif, compare, history) replaces
// only a previous output of stopspan, and only with --force; a path that may not be replaced or cannot be
// written, or a history database that is not this tool's, fails with one line and exit 2 before the feed
// is read, and leaves every file as it was. A reading command leaves another program's database unchanged.

import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import { ROOT, runCli } from '../helpers/cli.js';
import { REPORT_MARKER } from '../../src/report/writeFolder.js';

const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
const roots: string[] = [];
let work: string;
beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'stopspan-out-'));
  roots.push(work);
  copyFileSync(DEMO, join(work, 'feed.zip'));
  writeFileSync(join(work, 'notes.txt'), 'a planner’s notes');
});
afterAll(() => roots.forEach((d) => rmSync(d, { recursive: true, force: true })));

const run = (args: string[]) => runCli(args, { cwd: work });

/** Every file under folder with a hash of its bytes. */
function snapshot(folder: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const e of readdirSync(folder, { withFileTypes: true, recursive: true })) {
    const p = join(e.parentPath, e.name);
    out[p.slice(folder.length)] = e.isFile() ? createHash('sha256').update(readFileSync(p)).digest('hex') : '<folder>';
  }
  return out;
}

function oneErrorLine(stderr: string): string {
  const lines = stderr.trimEnd().split('\n');
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(/^error: /);
  return lines[0];
}

describe('--force replaces only a previous output', () => {
  it('refuses the working folder and the folder above it, leaving the feed and every other file', async () => {
    const before = snapshot(work);
    for (const out of ['.', '..', work]) {
      const r = await run(['audit', 'feed.zip', '--out', out, '--force']);
      expect(r.code).toBe(2);
      expect(oneErrorLine(r.stderr)).toBe(
        `error: ${out}: cannot use this as the output folder: it is the working folder or a folder above it`,
      );
    }
    expect(snapshot(work)).toEqual(before);
  });

  it('refuses a file given as --out, and a folder holding the input feed', async () => {
    let r = await run(['audit', 'feed.zip', '--out', 'notes.txt', '--force']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toBe(
      'error: notes.txt: cannot use this as the output folder: it is a file, not a folder; only a folder stopspan wrote is ever replaced',
    );
    // a folder dressed as a previous output, but holding the feed this run reads
    mkdirSync(join(work, 'sub'));
    copyFileSync(DEMO, join(work, 'sub', 'feed.zip'));
    writeFileSync(join(work, 'sub', REPORT_MARKER), JSON.stringify({ writtenBy: 'stopspan', files: ['feed.zip'] }));
    const before = snapshot(work);
    r = await run(['audit', 'sub/feed.zip', '--out', 'sub', '--force']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toBe('error: sub: cannot use this as the output folder: it holds the input sub/feed.zip');
    expect(snapshot(work)).toEqual(before);
  });

  it('refuses a folder of other files, with or without --force', async () => {
    mkdirSync(join(work, 'gis'));
    writeFileSync(join(work, 'gis', 'stops.geojson'), '{}');
    const before = snapshot(work);
    for (const force of [[], ['--force']]) {
      const r = await run(['audit', 'feed.zip', '--out', 'gis', ...force]);
      expect(r.code).toBe(2);
      expect(oneErrorLine(r.stderr)).toMatch(
        /^error: gis: cannot use this as the output folder: it exists and is not a stopspan output folder/,
      );
    }
    expect(snapshot(work)).toEqual(before);
  });

  it('replaces a previous report with --force, and the marker says which files it wrote', async () => {
    expect((await run(['audit', 'feed.zip', '--out', 'rep', '--format', 'csv', '-q'])).code).toBe(0);
    const again = await run(['audit', 'feed.zip', '--out', 'rep', '--format', 'json', '-q']);
    expect(again.code).toBe(2);
    expect(oneErrorLine(again.stderr)).toBe(
      'error: rep: the output folder already exists; choose another folder or pass --force to replace it',
    );
    expect((await run(['audit', 'feed.zip', '--out', 'rep', '--format', 'json', '-q', '--force'])).code).toBe(0);
    // json: summary.json and the optimiser's plan.json (this feed has stops the optimiser drops)
    expect(readdirSync(join(work, 'rep')).sort()).toEqual([REPORT_MARKER, 'plan.json', 'summary.json']);
    expect(JSON.parse(readFileSync(join(work, 'rep', REPORT_MARKER), 'utf8')).files).toEqual(['summary.json', 'plan.json']);
  });

  it('compare, history and whatif follow the same rule (compare and history overwrote silently before)', async () => {
    expect((await run(['compare', 'feed.zip', 'feed.zip', '--no-audit', '--out', 'cmp', '-q'])).code).toBe(0);
    const first = snapshot(join(work, 'cmp'));
    expect(Object.keys(first).sort()).toEqual([`/${REPORT_MARKER}`, '/compare-trips.csv', '/compare.html', '/compare.json']);
    let r = await run(['compare', 'feed.zip', 'feed.zip', '--no-audit', '--out', 'cmp', '-q']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toMatch(/^error: cmp: the output folder already exists/);
    expect((await run(['compare', 'feed.zip', 'feed.zip', '--no-audit', '--out', 'cmp', '-q', '--force'])).code).toBe(0);
    const before = snapshot(work);
    r = await run(['compare', 'feed.zip', 'feed.zip', '--no-audit', '--out', '.', '--force']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toMatch(/working folder/);
    r = await run(['whatif', 'feed.zip', '--remove', 'S1', '--out', '.', '--force']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toMatch(/^error: \.: cannot use this as the output folder: it is the working folder/);
    expect(snapshot(work)).toEqual(before);

    expect((await run(['check', 'feed.zip', '--history', 'h.sqlite', '--fail-on', 'never'])).code).toBe(0);
    expect((await run(['history', 'h.sqlite', '--out', 'trend', '-q'])).code).toBe(0);
    r = await run(['history', 'h.sqlite', '--out', 'trend', '-q']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toMatch(/^error: trend: the output folder already exists/);
    expect((await run(['history', 'h.sqlite', '--out', 'trend', '-q', '--force'])).code).toBe(0);
    r = await run(['history', 'h.sqlite', '--out', 'notes.txt', '--force']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toMatch(/notes\.txt: cannot use this as the output folder: it is a file/);
    expect(readFileSync(join(work, 'notes.txt'), 'utf8')).toBe('a planner’s notes');
  });
});

describe('an output that cannot be written fails before the work, with exit 2 naming it', () => {
  it('under /proc, through a dangling link, below a file: before the feed is read', async () => {
    // the feed does not exist: had it been read first, the error would name it
    for (const [out, why] of [
      ['/proc/stopspan-report', /cannot write in \/proc: /],
      ['dangling', /it is a symbolic link/],
      ['dangling/sub', /dangling is a symbolic link to nothing/],
      ['notes.txt/sub', /notes\.txt is not a folder|a part of the path is a file/],
    ] as const) {
      if (out === 'dangling') symlinkSync(join(work, 'nowhere'), join(work, 'dangling'));
      const r = await run(['audit', 'no-such-feed.zip', '--out', out]);
      expect(r.code).toBe(2);
      const line = oneErrorLine(r.stderr);
      expect(line.startsWith(`error: ${out}: cannot use this as the output folder: `)).toBe(true);
      expect(line).toMatch(why);
    }
    expect(existsSync('/proc/stopspan-report')).toBe(false);
  });

  it('audit --history with a file that is not a history: exit 2 before the audit, no report written', async () => {
    writeFileSync(join(work, 'bad.sqlite'), 'this is not a database, it is the timetable office’s notes\n'.repeat(100));
    const other = new Database(join(work, 'other.sqlite'));
    other.exec("CREATE TABLE depots (name TEXT); INSERT INTO depots VALUES ('Vellmoor North')");
    other.close();
    const before = snapshot(work);
    for (const [db, why] of [
      ['bad.sqlite', /bad\.sqlite: cannot prepare the history database: file is not a database/],
      ['other.sqlite', /other\.sqlite: not a stopspan history database: it is another program's \(it holds depots\)/],
    ] as const) {
      for (const cmd of [
        ['audit', 'feed.zip', '--out', 'rep'],
        ['check', 'feed.zip'],
      ]) {
        const r = await run([...cmd, '--history', db]);
        expect(r.code).toBe(2);
        expect(oneErrorLine(r.stderr)).toMatch(why);
        expect(r.stdout).toBe('');
      }
    }
    expect(existsSync(join(work, 'rep'))).toBe(false);
    expect(snapshot(work)).toEqual(before);
  });
});

describe('history, a reading command, changes nothing in the database', () => {
  it("refuses another program's database and leaves its bytes and journal mode as they were", async () => {
    const path = join(work, 'other.sqlite');
    const other = new Database(path);
    other.exec("CREATE TABLE depots (name TEXT); INSERT INTO depots VALUES ('Vellmoor North')");
    other.close();
    const before = snapshot(work);
    const r = await run(['history', 'other.sqlite']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toBe(
      "error: other.sqlite: not a stopspan history database: it is another program's (it holds depots); give a new file or one stopspan wrote",
    );
    expect(snapshot(work)).toEqual(before); // no tables added, no -wal or -shm file
    const again = new Database(path, { readonly: true });
    expect(again.pragma('journal_mode', { simple: true })).toBe('delete');
    again.close();
  });

  it('reads a history of this tool without writing to it', async () => {
    expect((await run(['check', 'feed.zip', '--history', 'h.sqlite', '--fail-on', 'never'])).code).toBe(0);
    const db = new Database(join(work, 'h.sqlite'));
    db.pragma('wal_checkpoint(TRUNCATE)');
    db.close();
    const before = snapshot(work);
    const r = await run(['history', 'h.sqlite', '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).runs).toHaveLength(1);
    const after = snapshot(work);
    expect(after['/h.sqlite']).toBe(before['/h.sqlite']);
  });
});
