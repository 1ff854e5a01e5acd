// Runs the built CLI as `stopspan` runs it (the bundle dist/bin/stopspan.js that package.json's bin names)
// and captures what it printed. Importing this module builds dist/ first when it is older than the
// sources (tsc, then the command's bundle, as npm run build does), so only the test files that need the
// built command pay for the build. Test files run in parallel processes: one of them takes a lock
// directory and builds while the others wait for it, then all see a stamp newer than every source file
// and go on; a run whose sources have not changed since the last build builds nothing.
import { execFileSync, spawn } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';

export const ROOT = resolve(__dirname, '../..');
const BIN = join(ROOT, 'dist/bin/stopspan.js');
const STAMP = join(ROOT, 'dist/.built-for-tests');
const LOCK = join(ROOT, 'dist.building-for-tests');
const STALE_LOCK_MS = 10 * 60_000; // a lock left by a killed run is taken over after this long
/** What the build reads besides src/: a change to any of them makes dist/ stale. */
const INPUTS = ['tsconfig.json', 'package.json', 'scripts/bundle-cli.mjs'];

function newestInput(): number {
  let newest = 0;
  const walk = (dir: string): void => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else newest = Math.max(newest, statSync(p).mtimeMs);
    }
  };
  walk(join(ROOT, 'src'));
  for (const f of INPUTS) newest = Math.max(newest, statSync(join(ROOT, f)).mtimeMs);
  return newest;
}

function fresh(): boolean {
  return existsSync(BIN) && existsSync(STAMP) && statSync(STAMP).mtimeMs >= newestInput();
}

function sleepMs(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

function build(): void {
  execFileSync(process.execPath, [join(ROOT, 'node_modules/typescript/bin/tsc'), '-p', 'tsconfig.json'], { cwd: ROOT, stdio: 'inherit' });
  execFileSync(process.execPath, [join(ROOT, 'scripts/bundle-cli.mjs')], { cwd: ROOT, stdio: 'inherit' });
}

/** Builds dist/ unless it is newer than every source; safe to call from parallel test processes. */
export function ensureBuilt(): string {
  while (!fresh()) {
    try {
      mkdirSync(LOCK);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
      const lockedAt = statSync(LOCK, { throwIfNoEntry: false })?.mtimeMs ?? Date.now();
      if (Date.now() - lockedAt > STALE_LOCK_MS) rmSync(LOCK, { recursive: true, force: true });
      sleepMs(200); // another test process is building
      continue;
    }
    try {
      if (!fresh()) {
        const started = new Date();
        build();
        // dated to the build's start, so a source saved while the build ran makes dist/ stale again
        writeFileSync(STAMP, '');
        utimesSync(STAMP, started, started);
      }
    } finally {
      rmSync(LOCK, { recursive: true, force: true });
    }
  }
  return BIN;
}

/** The built command, built on first import of this module (see the top of the file). */
export const CLI = ensureBuilt();

export interface CliRun {
  code: number | null;
  stdout: string;
  stderr: string;
}

export function runCli(args: string[], options: { cwd?: string; nodeArgs?: string[] } = {}): Promise<CliRun> {
  return new Promise((ok, fail) => {
    const p = spawn(process.execPath, [...(options.nodeArgs ?? []), CLI, ...args], {
      cwd: options.cwd ?? ROOT,
      env: { ...process.env, NO_COLOR: '1' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    p.stdout.on('data', (d) => (stdout += d));
    p.stderr.on('data', (d) => (stderr += d));
    p.on('error', fail);
    p.on('close', (code) => ok({ code, stdout, stderr }));
  });
}
