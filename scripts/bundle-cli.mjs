#!/usr/bin/env node
// Bundles the built command line (dist/cli/main.js and the project modules it reaches) into a few files
// in dist/bin/: stopspan.js, the command `stopspan` runs, and one chunk per part loaded on demand. Why:
// Node resolves, reads and compiles every ES module of a program one by one, and for the ~60 modules of an
// audit that start-up cost 60-80 ms of the main thread (measured on Manhattan, see README, Speed and
// memory). Two CommonJS packages of the start-up path go in too (below); other packages and Node's own
// modules stay outside the bundle, loaded as before. The library (dist/index.js) is not bundled.
// Run after tsc: `node scripts/bundle-cli.mjs [DIST]`.

import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { isBuiltin } from 'node:module';
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

/**
 * CommonJS packages on the start-up path, which src/common/requireCjs.ts loads with require: in the
 * bundle they are built in, so Node neither searches node_modules for them nor wraps their files one by
 * one (13-17 ms for commander, 5-7 ms for yauzl and its two dependencies, measured alone).
 */
const BUILT_IN = ['commander', 'yauzl'];
const packageDir = (p) => {
  const m = /[\\/]node_modules[\\/]((?:@[^\\/]+[\\/])?[^\\/]+)/.exec(p);
  return m ? m[1] : null;
};
const requireCjsFile = path.join(distDir, 'common/requireCjs.js');

await build({
  input: entry,
  platform: 'node',
  // the project's own modules (relative imports) go in, and the packages above with what they require;
  // other packages and Node's modules stay imports, loaded at run time as without the bundle
  external: (id, importer) => {
    if (id.startsWith('.') || path.isAbsolute(id)) return false;
    if (isBuiltin(id)) return true;
    if (BUILT_IN.includes(id)) return false;
    return !(importer && BUILT_IN.includes(packageDir(importer)));
  },
  plugins: [
    {
      name: 'stopspan-require-cjs',
      // requireCjs hands out the built-in packages; anything else it still requires from node_modules
      load(id) {
        if (path.resolve(id) !== requireCjsFile) return null;
        // what require() gives for each: commander's exports ({ Command, ... }), yauzl's module object
        // (a name added to BUILT_IN needs its line here, or requireCjs still requires it at run time)
        return [
          "import { createRequire } from 'node:module';",
          "import * as commander from 'commander';",
          "import yauzl from 'yauzl';",
          'const builtIn = { commander, yauzl };',
          'const fallback = createRequire(import.meta.url);',
          'export const requireCjs = (name) => builtIn[name] ?? fallback(name);',
        ].join('\n');
      },
    },
  ],
  output: { dir: outDir, format: 'esm', entryFileNames: 'stopspan.js', chunkFileNames: '[name]-[hash].js', sourcemap: false },
  // a module loaded both on demand and up front stays in the up-front chunk: expected, not a problem
  onLog(level, log, handler) {
    if (log.code === 'INEFFECTIVE_DYNAMIC_IMPORT') return;
    handler(level, log);
  },
});
fs.chmodSync(path.join(outDir, 'stopspan.js'), 0o755);
