// Builds dist/ once before any test file runs, so CLI tests never race each other rebuilding it.
import { execFileSync } from 'node:child_process';
import { join, resolve } from 'node:path';

export default function setup(): void {
  const root = resolve(__dirname, '..');
  execFileSync(process.execPath, [join(root, 'node_modules/typescript/bin/tsc'), '-p', 'tsconfig.json'], { cwd: root, stdio: 'inherit' });
}
