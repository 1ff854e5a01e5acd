// The direction of imports in src/: every stage imports only the stages below it in the pipeline
// (common, gtfs, network, realtime, model, then the products, then the reports, then the command line), and
// no files import each other in a loop. Read from the import statements of src/**/*.ts as text (static,
// type-only and dynamic imports alike), so a new import that runs back up or closes a circle fails here
// with the files named. The reader and the two rules are first tried on a small made-up tree.

import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { describe, expect, it } from 'vitest';

const SRC = join(import.meta.dirname, '..', 'src');

/**
 * The floors of the pipeline, lowest first. A file may import files of its own folder and of any folder on
 * a lower floor; folders on one floor do not import each other. A folder of src/ that is on no floor fails
 * the test, so a new stage is placed here when it is made.
 */
const FLOORS: string[][] = [
  ['common', 'version.ts'],
  ['gtfs'],
  ['network'],
  ['realtime', 'landuse'],
  ['model'],
  ['audit', 'check'],
  ['whatif', 'compare', 'history'], // weigh on the audit's prepared patterns, compare two audits, record runs
  ['report'],
  ['cli'],
  ['index.ts'],
];

/** Relative module names a source text imports: `import ... from`, `export ... from`, `import '...'`, `import('...')`. */
export function importedNames(text: string): string[] {
  const names: string[] = [];
  const patterns = [
    /^\s*(?:import|export)\b[^;'"]*?\bfrom\s*['"]([^'"]+)['"]/gm,
    /^\s*import\s*['"]([^'"]+)['"]/gm,
    /\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g,
  ];
  for (const re of patterns) for (const m of text.matchAll(re)) names.push(m[1]);
  return names.filter((n) => n.startsWith('.'));
}

/** The part of src/ a file belongs to: its top folder, or the file's own name at the top. */
function partOf(file: string): string {
  return file.split('/')[0];
}

export interface ImportFaults {
  unresolved: string[]; // "file -> name" for a relative import that names no file of the tree
  unplaced: string[]; // parts of the tree that stand on no floor
  upward: string[]; // "file -> file" for an import of a higher floor or of another folder on the same floor
  circles: string[][]; // each a loop of files, the first repeated at the end
}

/** Finds the faults of a tree given as file path (relative, '/'-separated, .ts) -> source text. */
export function importFaults(files: Map<string, string>, floors: string[][]): ImportFaults {
  const floorOf = new Map<string, number>();
  floors.forEach((parts, i) => parts.forEach((p) => floorOf.set(p, i)));
  const faults: ImportFaults = { unresolved: [], unplaced: [], upward: [], circles: [] };
  const edges = new Map<string, string[]>();
  for (const [file, text] of files) {
    const to: string[] = [];
    for (const name of importedNames(text)) {
      const target = join(dirname(file), name.replace(/\.js$/, '.ts')).split(sep).join('/');
      if (!files.has(target)) {
        faults.unresolved.push(`${file} -> ${name}`);
        continue;
      }
      to.push(target);
      const from = partOf(file);
      const into = partOf(target);
      if (from === into) continue;
      const a = floorOf.get(from);
      const b = floorOf.get(into);
      if (a === undefined || b === undefined) continue; // reported as unplaced below
      if (b >= a) faults.upward.push(`${file} -> ${target}`);
    }
    edges.set(file, to);
  }
  faults.unplaced = [...new Set([...files.keys()].map(partOf))].filter((p) => !floorOf.has(p)).sort();
  // circles: a depth-first walk; a grey file met again closes a loop
  const state = new Map<string, 'grey' | 'black'>();
  const path: string[] = [];
  const visit = (f: string): void => {
    state.set(f, 'grey');
    path.push(f);
    for (const g of edges.get(f) ?? []) {
      const s = state.get(g);
      if (s === 'grey') faults.circles.push([...path.slice(path.indexOf(g)), g]);
      else if (s === undefined) visit(g);
    }
    path.pop();
    state.set(f, 'black');
  };
  for (const f of [...files.keys()].sort()) if (!state.has(f)) visit(f);
  return faults;
}

function readTree(root: string): Map<string, string> {
  const files = new Map<string, string>();
  const walk = (dir: string): void => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.name.endsWith('.ts')) files.set(relative(root, p).split(sep).join('/'), readFileSync(p, 'utf8'));
    }
  };
  walk(root);
  return files;
}

describe('the import reader and its rules, on a made-up tree', () => {
  const floors = [['common'], ['gtfs'], ['model'], ['report']];

  it('reads static, multi-line, type-only, re-export, side-effect and dynamic imports, and leaves packages out', () => {
    const text = [
      "import { a } from './a.js';",
      'import {',
      '  b,',
      '  type C,',
      "} from '../b.js';",
      "import type { D } from './d.js';",
      "export * from './e.js';",
      "import './f.js';",
      "const g = await import('./g.js');",
      "let h: import('./h.js').H;",
      "import yauzl from 'yauzl';",
      "import { readFileSync } from 'node:fs';",
    ].join('\n');
    expect(importedNames(text)).toEqual(['./a.js', '../b.js', './d.js', './e.js', './f.js', './g.js', './h.js']);
  });

  it('finds an import that runs back up, one between folders of a floor, a circle, an unknown file and an unplaced folder', () => {
    const tree = new Map<string, string>([
      ['common/errors.ts', ''],
      ['gtfs/read.ts', "import { StopspanError } from '../common/errors.js';"],
      ['model/params.ts', "import type { Row } from '../report/rows.js';\nimport { read } from '../gtfs/read.js';"],
      ['report/rows.ts', "import { x } from './page.js';"],
      ['report/page.ts', "import { y } from './rows.js';\nimport { z } from './gone.js';"],
      ['stray/thing.ts', "import { read } from '../gtfs/read.js';"],
    ]);
    const f = importFaults(tree, floors);
    expect(f.upward).toEqual(['model/params.ts -> report/rows.ts']);
    expect(f.circles).toEqual([['report/rows.ts', 'report/page.ts', 'report/rows.ts']]);
    expect(f.unresolved).toEqual(['report/page.ts -> ./gone.js']);
    expect(f.unplaced).toEqual(['stray']);
    const sameFloor = importFaults(
      new Map([
        ['a/x.ts', "import { y } from '../b/y.js';"],
        ['b/y.ts', ''],
      ]),
      [['a', 'b']],
    );
    expect(sameFloor.upward).toEqual(['a/x.ts -> b/y.ts']);
  });

  it('passes a tree whose imports all run down', () => {
    const tree = new Map<string, string>([
      ['common/errors.ts', ''],
      ['gtfs/read.ts', "import { StopspanError } from '../common/errors.js';"],
      ['report/page.ts', "import { read } from '../gtfs/read.js';\nconst m = await import('../common/errors.js');"],
    ]);
    expect(importFaults(tree, floors)).toEqual({ unresolved: [], unplaced: [], upward: [], circles: [] });
  });
});

describe('src/', () => {
  const tree = readTree(SRC);

  it('is read whole (the tree and every stage of the pipeline are there)', () => {
    expect(existsSync(resolve(SRC, 'index.ts'))).toBe(true);
    const parts = new Set([...tree.keys()].map(partOf));
    for (const floor of FLOORS) for (const part of floor) expect(parts.has(part), part).toBe(true);
    expect(tree.size).toBeGreaterThan(50);
  });

  it('has every import resolved, every folder on a floor, no import running back up and no circle', () => {
    expect(importFaults(tree, FLOORS)).toEqual({ unresolved: [], unplaced: [], upward: [], circles: [] });
  });
});
