// The one folder writer: it replaces only a previous output of this tool (its marker and the files the
// marker names), never the working folder or one above it, the home folder, the root, a folder holding an
// input, a file or a link; it says why in one coded error naming the path; it checks that the folder can be
// written before any work; and it sweeps temporary folders left by runs that are no longer alive.

import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterAll, afterEach, beforeEach, describe, expect, it } from 'vitest';
import { REPORT_MARKER, checkOutFolder, sweepStaleTemp, writeFolder } from '../../src/report/writeFolder.js';
import { rejected } from '../helpers/errors.js';

let work: string;
const roots: string[] = [];
beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'stopspan-folder-'));
  roots.push(work);
});
afterAll(() => roots.forEach((d) => rmSync(d, { recursive: true, force: true })));

/** A pid that was alive a moment ago and is not any more. */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(r.stdout);
}

/** Everything under folder, as relative paths with their contents, to prove nothing changed. */
function snapshot(folder: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const e of readdirSync(folder, { withFileTypes: true, recursive: true })) {
    const p = join(e.parentPath, e.name);
    out[p.slice(folder.length)] = e.isFile() ? readFileSync(p, 'utf8') : '<folder>';
  }
  return out;
}

describe('writeFolder: what it writes', () => {
  it('writes a marker naming the files written with the folder, and returns only the files', async () => {
    const out = join(work, 'report');
    const paths = await writeFolder(out, [
      ['a.csv', 'x\r\n'],
      ['b.json', () => '{}\n'],
    ]);
    expect(paths).toEqual([join(out, 'a.csv'), join(out, 'b.json')]);
    expect(readdirSync(out).sort()).toEqual([REPORT_MARKER, 'a.csv', 'b.json']);
    const marker = JSON.parse(readFileSync(join(out, REPORT_MARKER), 'utf8'));
    expect(marker).toMatchObject({ writtenBy: 'stopspan', files: ['a.csv', 'b.json'] });
    expect(readdirSync(work)).toEqual(['report']);
  });

  it('replaces a previous output with force, even one with other names (another command wrote it)', async () => {
    const out = join(work, 'report');
    await writeFolder(out, [
      ['compare.html', 'old'],
      ['compare.json', '{}'],
    ]);
    await writeFolder(out, [['history.html', 'new']], { force: true });
    expect(readdirSync(out).sort()).toEqual([REPORT_MARKER, 'history.html']);
    expect(readdirSync(work)).toEqual(['report']);
  });
  it('fills an empty folder made ready for it (as mkdtemp makes one) with force, and refuses it without', async () => {
    const out = join(work, 'ready');
    mkdirSync(out);
    expect((await rejected(writeFolder(out, [['a.csv', 'x']]))).code).toBe('output-exists');
    await writeFolder(out, [['a.csv', 'x']], { force: true });
    expect(readdirSync(out).sort()).toEqual([REPORT_MARKER, 'a.csv']);
  });
});

describe('writeFolder: what it refuses, with or without force, leaving everything as it was', () => {
  afterEach(() => {
    expect(readdirSync(work).filter((n) => /\.(tmp|old)-/.test(n))).toEqual([]); // no temporary folder left
  });

  it('a folder holding files that are not a previous output', async () => {
    const out = join(work, 'mine');
    mkdirSync(out);
    writeFileSync(join(out, 'notes.txt'), 'keep me');
    const before = snapshot(work);
    for (const force of [false, true]) {
      const e = await rejected(writeFolder(out, [['index.html', 'x']], { force }));
      expect(e.code).toBe('bad-output');
      expect(e.oneLine()).toBe(
        `${out}: cannot use this as the output folder: it exists and is not a stopspan output folder (no ${REPORT_MARKER}); remove it yourself or choose another folder`,
      );
    }
    expect(snapshot(work)).toEqual(before);
  });

  it('a previous output to which someone added a file, or a folder', async () => {
    const out = join(work, 'report');
    await writeFolder(out, [['index.html', 'old']]);
    writeFileSync(join(out, 'my-notes.txt'), 'keep me');
    let before = snapshot(work);
    let e = await rejected(writeFolder(out, [['index.html', 'new']], { force: true }));
    expect(e.message).toMatch(/it holds my-notes\.txt, which stopspan did not write there/);
    expect(snapshot(work)).toEqual(before);
    rmSync(join(out, 'my-notes.txt'));
    mkdirSync(join(out, 'index.html.d'));
    before = snapshot(work);
    e = await rejected(writeFolder(out, [['index.html', 'new']], { force: true }));
    expect(e.message).toMatch(/it holds index\.html\.d/);
    expect(snapshot(work)).toEqual(before);
  });

  it("a marker that lists a name which is a folder, or a marker that is not this tool's", async () => {
    const out = join(work, 'forged');
    mkdirSync(join(out, 'data'), { recursive: true });
    writeFileSync(join(out, REPORT_MARKER), JSON.stringify({ writtenBy: 'stopspan', files: ['data'] }));
    expect((await rejected(writeFolder(out, [['a.csv', '']], { force: true }))).message).toMatch(/it holds data/);
    writeFileSync(join(out, REPORT_MARKER), 'not json');
    rmSync(join(out, 'data'), { recursive: true });
    expect((await rejected(writeFolder(out, [['a.csv', '']], { force: true }))).message).toMatch(/not a stopspan output folder/);
    expect(existsSync(join(out, REPORT_MARKER))).toBe(true);
  });

  it('a file, and a path below a file', async () => {
    const file = join(work, 'feed.zip');
    writeFileSync(file, 'PK');
    for (const force of [false, true]) {
      const e = await rejected(writeFolder(file, [['a.csv', '']], { force }));
      expect(e.code).toBe('bad-output');
      expect(e.oneLine()).toMatch(/feed\.zip: cannot use this as the output folder: it is a file, not a folder/);
    }
    expect((await rejected(writeFolder(join(file, 'sub'), [['a.csv', '']], { force: true }))).message).toMatch(
      /feed\.zip is not a folder|a part of the path is a file/,
    );
    expect(readFileSync(file, 'utf8')).toBe('PK');
  });

  it('a symbolic link, dangling or to a previous output', async () => {
    const dangling = join(work, 'dangling');
    symlinkSync(join(work, 'nowhere'), dangling);
    expect((await rejected(writeFolder(dangling, [['a.csv', '']], { force: true }))).oneLine()).toMatch(
      /dangling: cannot use this as the output folder: it is a symbolic link/,
    );
    const report = join(work, 'report');
    await writeFolder(report, [['a.csv', 'old']]);
    const link = join(work, 'link');
    symlinkSync(report, link);
    expect((await rejected(writeFolder(link, [['a.csv', 'new']], { force: true }))).oneLine()).toMatch(
      /link: cannot use this as the output folder: it is a symbolic link/,
    );
    expect(readFileSync(join(report, 'a.csv'), 'utf8')).toBe('old');
    expect((await rejected(writeFolder(join(dangling, 'sub'), [['a.csv', '']]))).message).toMatch(/dangling is a symbolic link to nothing/);
  });

  it('a previous output that holds an input of the run (the feed, or the feed inside it)', async () => {
    const out = join(work, 'report');
    await writeFolder(out, [
      ['feed.zip', 'PK'],
      ['a.csv', ''],
    ]);
    const before = snapshot(work);
    const e = await rejected(writeFolder(out, [['a.csv', '']], { force: true, inputs: [join(out, 'feed.zip'), undefined] }));
    expect(e.oneLine()).toMatch(/report: cannot use this as the output folder: it holds the input .*report\/feed\.zip/);
    expect((await rejected(writeFolder(out, [['a.csv', '']], { force: true, inputs: [out] }))).message).toMatch(/it holds the input/);
    expect(snapshot(work)).toEqual(before);
    // a link inside the folder that points to the feed elsewhere is an input too
    const elsewhere = join(work, 'feeds');
    mkdirSync(elsewhere);
    writeFileSync(join(elsewhere, 'gtfs.zip'), 'PK');
    const linked = join(work, 'linked');
    await writeFolder(linked, [['a.csv', '']]);
    symlinkSync(join(elsewhere, 'gtfs.zip'), join(linked, 'gtfs.zip'));
    writeFileSync(join(linked, REPORT_MARKER), JSON.stringify({ writtenBy: 'stopspan', files: ['a.csv', 'gtfs.zip'] }));
    expect((await rejected(writeFolder(linked, [['a.csv', '']], { force: true, inputs: [join(linked, 'gtfs.zip')] }))).message).toMatch(
      /it holds the input/,
    );
    expect(readFileSync(join(linked, 'gtfs.zip'), 'utf8')).toBe('PK');
    // a URL is not a path: it never matches
    await writeFolder(out, [['a.csv', 'new']], { force: true, inputs: ['https://data.vellmoor.example/gtfs.zip'] });
  });

  it('the working folder and every folder above it, the root, and the home folder', async () => {
    const here = process.cwd();
    for (const p of ['.', '..', here, dirname(here)]) {
      const e = await rejected(checkOutFolder(p, { force: true }));
      expect(e.code).toBe('bad-output');
      expect(e.oneLine()).toBe(`${p}: cannot use this as the output folder: it is the working folder or a folder above it`);
    }
    expect((await rejected(checkOutFolder('/', { force: true }))).message).toMatch(/it is the root folder/);
    // a home folder that even looks like a previous output is refused
    const home = join(work, 'home');
    await writeFolder(home, [['a.csv', '']]);
    const saved = process.env.HOME;
    process.env.HOME = home;
    try {
      expect((await rejected(writeFolder(home, [['a.csv', '']], { force: true }))).message).toMatch(/it is the home folder/);
    } finally {
      process.env.HOME = saved;
    }
    expect(readdirSync(home).sort()).toEqual([REPORT_MARKER, 'a.csv']);
  });

  it('a place that cannot be written, before any work: under /proc, a read-only parent', async () => {
    const e = await rejected(checkOutFolder('/proc/stopspan-report'));
    expect(e.code).toBe('bad-output');
    expect(e.oneLine()).toMatch(/^\/proc\/stopspan-report: cannot use this as the output folder: cannot write in \/proc: /);
    expect(existsSync('/proc/stopspan-report')).toBe(false);
  });

  it.skipIf(process.getuid?.() === 0)('a read-only parent (skipped as root, who may write anywhere)', async () => {
    const { chmodSync } = await import('node:fs');
    const ro = join(work, 'ro');
    mkdirSync(ro);
    chmodSync(ro, 0o555);
    try {
      expect((await rejected(checkOutFolder(join(ro, 'new', 'report')))).message).toMatch(/cannot write in .*ro: permission denied/);
    } finally {
      chmodSync(ro, 0o755);
    }
    expect(readdirSync(ro)).toEqual([]);
  });
});

describe('sweepStaleTemp', () => {
  it('removes temporary folders of runs that are over, puts a moved-aside output back, and touches nothing else', async () => {
    const dead = deadPid();
    const mk = (name: string, files: string[] = ['index.html']) => {
      mkdirSync(join(work, name));
      for (const f of files) writeFileSync(join(work, name, f), 'x');
    };
    mk(`.report.tmp-${dead}-abc-def123`);
    mk(`.empty.tmp-${dead}-abc-def123`, []);
    mk(`.gone.old-${dead}-abc-def123`, [REPORT_MARKER, 'index.html']); // died between the two renames
    mk(`.kept.old-${dead}-abc-def123`); // its replacement made it: this one goes
    mk('kept');
    mk(`.live.tmp-${process.pid}-abc-def123`); // a run in progress
    mk(`.odd.tmp-${dead}-abc-def123`);
    mkdirSync(join(work, `.odd.tmp-${dead}-abc-def123`, 'sub')); // not what this tool leaves
    mk(`.notes.tmp-${dead}`); // not this tool's naming
    mk('holiday.tmp-1-a-b');
    const done = await sweepStaleTemp(work);
    expect(done.map((p) => p.slice(work.length + 1)).sort()).toEqual(
      [
        `.empty.tmp-${dead}-abc-def123`,
        `.gone.old-${dead}-abc-def123`,
        `.kept.old-${dead}-abc-def123`,
        `.report.tmp-${dead}-abc-def123`,
      ].sort(),
    );
    expect(readdirSync(work).sort()).toEqual(
      [
        'gone',
        'kept',
        `.live.tmp-${process.pid}-abc-def123`,
        `.odd.tmp-${dead}-abc-def123`,
        `.notes.tmp-${dead}`,
        'holiday.tmp-1-a-b',
      ].sort(),
    );
    expect(readdirSync(join(work, 'gone')).sort()).toEqual([REPORT_MARKER, 'index.html']);
  });

  it('runs before each write beside the output', async () => {
    const dead = deadPid();
    mkdirSync(join(work, `.other.tmp-${dead}-abc-def123`));
    await writeFolder(join(work, 'report'), [['a.csv', '']]);
    expect(readdirSync(work)).toEqual(['report']);
  });
});
