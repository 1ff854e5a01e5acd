// Runs the built CLI as `stopspan` runs it (the bundle dist/bin/stopspan.js that package.json's bin names,
// built once by test/globalSetup.ts) and captures what it printed.
import { spawn } from 'node:child_process';
import { join, resolve } from 'node:path';

export const ROOT = resolve(__dirname, '../..');
export const CLI = join(ROOT, 'dist/bin/stopspan.js');

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
