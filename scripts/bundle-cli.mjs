#!/usr/bin/env node
// Bundles the built command line (dist/cli/main.js and the project modules it reaches) into a few files
// in dist/bin/: stopspan.js, the command `stopspan` runs, and one chunk per part loaded on demand. Why:
// Node resolves, reads and compiles every ES module of a program one by one, and for the ~60 modules of an
// audit that start-up cost 60-80 ms of the main thread (measured on Manhattan, see README, Speed and
// memory). Packages from node_modules and Node's own modules stay outside the bundle, loaded as before;
// the library (dist/index.js) is not bundled. Run after tsc: `node scripts/bundle-cli.mjs [DIST]`.

import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'rolldown';

const repoDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const distDir = path.resolve(process.argv[2] ?? path.join(repoDir, 'dist'));
const entry = path.join(distDir, 'cli/main.js');
const outDir = path.join(distDir, 'bin');

if (!fs.existsSync(entry)) {
  process.stderr.write(`bundle-cli: ${entry} is not built (run tsc first)\n`);
  process.exit(1);
}
fs.rmSync(outDir, { recursive: true, force: true });

await build({
  input: entry,
  platform: 'node',
  // only the project's own modules (relative imports) go in; packages and node: modules stay imports
  external: (id) => !id.startsWith('.') && !path.isAbsolute(id),
  output: { dir: outDir, format: 'esm', entryFileNames: 'stopspan.js', chunkFileNames: '[name]-[hash].js', sourcemap: false },
  // a module loaded both on demand and up front stays in the up-front chunk: expected, not a problem
  onLog(level, log, handler) {
    if (log.code === 'INEFFECTIVE_DYNAMIC_IMPORT') return;
    handler(level, log);
  },
});
fs.chmodSync(path.join(outDir, 'stopspan.js'), 0o755);
