// Builds dist/ once before any test file runs (tsc, then the command's bundle in dist/bin, as npm run
// build does), so CLI tests never race each other rebuilding it.
import { execFileSync } from 'node:child_process';
import { join, resolve } from 'node:path';

export default function setup(): void {
  const root = resolve(__dirname, '..');
  execFileSync(process.execPath, [join(root, 'node_modules/typescript/bin/tsc'), '-p', 'tsconfig.json'], { cwd: root, stdio: 'inherit' });
  execFileSync(process.execPath, [join(root, 'scripts/bundle-cli.mjs')], { cwd: root, stdio: 'inherit' });
}
