// Killing the built command: SIGINT or SIGTERM while it writes a report or downloads a feed removes what
// the run started and exits 130 or 143; a run killed outright (SIGKILL) leaves its temporary folder, which
// the next run beside it sweeps. Loopback only, every wait bounded.

import { spawn, type ChildProcess } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import http from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { CLI, ROOT } from '../helpers/cli.js';
import { REPORT_MARKER, writeFolder } from '../../src/report/writeFolder.js';
import { runInterruptUndo } from '../../src/common/interrupts.js';
import { listenLoopback } from '../helpers/loopback.js';

const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
const roots: string[] = [];
let work: string;
beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'stopspan-kill-'));
  roots.push(work);
  copyFileSync(DEMO, join(work, 'feed.zip'));
});
afterAll(() => roots.forEach((d) => rmSync(d, { recursive: true, force: true })));

interface Spawned {
  child: ChildProcess;
  done: Promise<{ code: number | null; signal: NodeJS.Signals | null; stderr: string }>;
}

function start(args: string[], env: Record<string, string> = {}): Spawned {
  const child = spawn(process.execPath, [CLI, ...args], {
    cwd: work,
    env: { ...process.env, NO_COLOR: '1', ...env },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  child.stderr!.on('data', (d) => (stderr += d));
  const done = new Promise<{ code: number | null; signal: NodeJS.Signals | null; stderr: string }>((ok) =>
    child.on('close', (code, signal) => ok({ code, signal, stderr })),
  );
  return { child, done };
}

/** Polls every millisecond until test() holds; fails after limitMs. */
async function until(test: () => boolean, limitMs: number, what: string): Promise<void> {
  const end = Date.now() + limitMs;
  while (!test()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 1));
  }
}

const tempIn = (folder: string) => readdirSync(folder).filter((n) => /\.(tmp|old)-\d+-/.test(n));

/** Starts an audit of the demo feed into rep/ and freezes it (SIGSTOP) while its temporary folder exists. */
async function frozenWhileWriting(extra: string[] = []): Promise<Spawned> {
  const run = start(['audit', 'feed.zip', '--out', 'rep', '-q', ...extra]);
  await until(() => tempIn(work).length > 0, 60_000, 'the temporary report folder');
  run.child.kill('SIGSTOP');
  expect(tempIn(work)).toHaveLength(1); // frozen mid-write: the folder is there, not yet renamed
  return run;
}

describe('an interrupt while the report is written', () => {
  for (const [signal, exit] of [
    ['SIGTERM', 143],
    ['SIGINT', 130],
  ] as const) {
    it(`${signal}: removes the temporary folder, writes no report, exits ${exit}`, async () => {
      const run = await frozenWhileWriting();
      run.child.kill(signal);
      run.child.kill('SIGCONT');
      const r = await run.done;
      expect(r.code).toBe(exit);
      expect(r.stderr).toMatch(new RegExp(`interrupted \\(${signal}\\): removed this run's temporary files`));
      expect(readdirSync(work)).toEqual(['feed.zip']);
    });
  }

  it('SIGTERM while a previous report is replaced: the previous report stays whole', async () => {
    const first = start(['audit', 'feed.zip', '--out', 'rep', '-q', '--format', 'json']);
    expect((await first.done).code).toBe(0);
    const before = readFileSync(join(work, 'rep', 'summary.json'), 'utf8');
    const run = await frozenWhileWriting(['--force']);
    run.child.kill('SIGTERM');
    run.child.kill('SIGCONT');
    expect((await run.done).code).toBe(143);
    expect(readdirSync(work).sort()).toEqual(['feed.zip', 'rep']);
    expect(readdirSync(join(work, 'rep')).sort()).toEqual([REPORT_MARKER, 'plan.json', 'summary.json']);
    expect(readFileSync(join(work, 'rep', 'summary.json'), 'utf8')).toBe(before);
  });

  it('SIGKILL leaves the temporary folder; the next run beside it sweeps it', async () => {
    const run = await frozenWhileWriting();
    run.child.kill('SIGKILL');
    expect((await run.done).signal).toBe('SIGKILL');
    expect(tempIn(work)).toHaveLength(1);
    const next = start(['audit', 'feed.zip', '--out', 'rep2', '-q', '--format', 'json']);
    expect((await next.done).code).toBe(0);
    expect(readdirSync(work).sort()).toEqual(['feed.zip', 'rep2']);
  });
});

describe('the undo steps a writer registers (in process)', () => {
  it('remove the temporary folder when run in the middle of writing', async () => {
    const out = join(work, 'rep');
    const p = writeFolder(out, [
      ['a.csv', 'x'],
      [
        'b.csv',
        () => {
          expect(tempIn(work)).toHaveLength(1);
          runInterruptUndo(); // what the CLI's signal handler does
          expect(tempIn(work)).toHaveLength(0);
          throw new Error('stopped');
        },
      ],
    ]);
    await expect(p).rejects.toThrow('stopped');
    expect(readdirSync(work)).toEqual(['feed.zip']);
  });
});

describe('an interrupt while a feed downloads', () => {
  let server: http.Server;
  let url = '';
  const open: http.ServerResponse[] = [];
  beforeAll(async () => {
    const zip = readFileSync(DEMO);
    server = http.createServer((_req, res) => {
      // a zip that never finishes: the first 64 KiB, then nothing
      res.writeHead(200, { 'content-type': 'application/zip', 'content-length': zip.length });
      res.write(zip.subarray(0, 65_536));
      open.push(res);
    });
    url = `${await listenLoopback(server)}/gtfs.zip`;
  });
  afterAll(async () => {
    open.forEach((r) => r.destroy());
    await new Promise((ok) => server.close(ok));
  });

  for (const [signal, exit] of [
    ['SIGINT', 130],
    ['SIGTERM', 143],
  ] as const) {
    it(`${signal}: removes the partial download and exits ${exit}`, async () => {
      const tmp = join(work, 'tmp');
      mkdirSync(tmp);
      const run = start(['check', url], { TMPDIR: tmp });
      const part = () => readdirSync(tmp).flatMap((d) => readdirSync(join(tmp, d)).map((f) => join(tmp, d, f)));
      await until(() => part().some((f) => readFileSync(f).length >= 65_536), 60_000, 'the partial download');
      expect(readdirSync(tmp)[0]).toMatch(new RegExp(`^stopspan-dl-${run.child.pid}-`));
      run.child.kill(signal);
      const r = await run.done;
      expect(r.code).toBe(exit);
      expect(readdirSync(tmp)).toEqual([]);
    });
  }

  it('a download folder left by a run that died is swept by the next download', async () => {
    const tmp = join(work, 'tmp');
    mkdirSync(tmp);
    const run = start(['check', url], { TMPDIR: tmp });
    await until(
      () => readdirSync(tmp).length > 0 && readdirSync(join(tmp, readdirSync(tmp)[0])).length > 0,
      60_000,
      'the partial download',
    );
    run.child.kill('SIGKILL');
    await run.done;
    const left = readdirSync(tmp);
    expect(left).toHaveLength(1);
    writeFileSync(join(tmp, 'stopspan-dl-notes.txt'), 'not a download folder'); // other names stay
    const next = start(['check', url], { TMPDIR: tmp });
    const own = () => readdirSync(tmp).find((n) => n.startsWith(`stopspan-dl-${next.child.pid}-`));
    await until(
      () => !readdirSync(tmp).includes(left[0]) && own() !== undefined && readdirSync(join(tmp, own()!)).length > 0,
      60_000,
      'the sweep and the new download',
    );
    next.child.kill('SIGTERM');
    expect((await next.done).code).toBe(143);
    expect(readdirSync(tmp)).toEqual(['stopspan-dl-notes.txt']);
  });
});
