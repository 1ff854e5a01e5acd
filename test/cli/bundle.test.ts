// The command `stopspan` runs is a bundle (dist/bin/stopspan.js, scripts/bundle-cli.mjs) of the modules
// tsc builds. Checked here: package.json's bin names it, it holds the project's code itself (it imports
// only its own chunks, packages and node: modules), and it writes the same report files as the unbundled
// dist/cli/main.js on the demo feed, timestamps aside.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseAst } from 'rolldown/parseAst';
import { afterAll, describe, expect, it } from 'vitest';
import { CLI, ROOT } from '../helpers/cli.js';

const BIN_DIR = join(ROOT, 'dist/bin');
const UNBUNDLED = join(ROOT, 'dist/cli/main.js');
const tmp = mkdtempSync(join(tmpdir(), 'stopspan-bundle-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** The specifiers of a module's static and dynamic imports, from its syntax tree (rolldown's parser). */
function importsOf(code: string): string[] {
  const out: string[] = [];
  const visit = (node: unknown): void => {
    if (Array.isArray(node)) return node.forEach(visit);
    if (!node || typeof node !== 'object') return;
    const n = node as { type?: string; source?: { type?: string; value?: unknown } };
    if (
      (n.type === 'ImportDeclaration' ||
        n.type === 'ImportExpression' ||
        n.type === 'ExportAllDeclaration' ||
        n.type === 'ExportNamedDeclaration') &&
      n.source &&
      typeof n.source.value === 'string'
    )
      out.push(n.source.value);
    for (const v of Object.values(n)) if (v && typeof v === 'object') visit(v);
  };
  visit(parseAst(code));
  return out;
}

function audit(cli: string, out: string): void {
  const r = spawnSync(
    process.execPath,
    [
      cli,
      'audit',
      'fixtures/demo/demo-feed.zip',
      '--ridership',
      'fixtures/demo/ridership.csv',
      '--observed',
      'fixtures/demo/realtime.zip',
      '--out',
      out,
      '--force',
      '-q',
    ],
    { cwd: ROOT, encoding: 'utf8' },
  );
  expect(r.status, r.stderr).toBe(0);
}

describe('the bundled command', () => {
  it('is what package.json names as the stopspan command', () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { bin: Record<string, string> };
    expect(join(ROOT, pkg.bin.stopspan)).toBe(CLI);
  });

  it('imports only its own chunks, packages and node: modules', () => {
    const files = readdirSync(BIN_DIR).filter((f) => f.endsWith('.js'));
    expect(files).toContain('stopspan.js');
    const seen: string[] = [];
    for (const f of files) {
      for (const spec of importsOf(readFileSync(join(BIN_DIR, f), 'utf8'))) {
        seen.push(spec);
        if (spec.startsWith('.')) {
          expect(spec, `${f} imports ${spec}`).toMatch(/^\.\/[^/]+\.js$/);
          expect(files, `${f} imports ${spec}`).toContain(spec.slice(2));
        }
      }
    }
    // the pattern above does see imports: the entry loads its chunks and Node's modules
    expect(seen.some((s) => s.startsWith('./'))).toBe(true);
    expect(seen.some((s) => s.startsWith('node:'))).toBe(true);
  });

  it('writes the same reports as the unbundled modules', () => {
    const a = join(tmp, 'bundled');
    const b = join(tmp, 'unbundled');
    audit(CLI, a);
    audit(UNBUNDLED, b);
    const names = readdirSync(a).sort();
    expect(names).toEqual(readdirSync(b).sort());
    expect(names).toContain('summary.json');
    // the run's own time stamp is the one thing allowed to differ
    const stamp = /\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z/g;
    for (const n of names) {
      const x = readFileSync(join(a, n), 'utf8').replace(stamp, 'T');
      const y = readFileSync(join(b, n), 'utf8').replace(stamp, 'T');
      expect(x === y, `${n} differs`).toBe(true);
    }
  });
});
