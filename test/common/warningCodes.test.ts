// The warning table: every code in it is raised somewhere in src/ (no dead rows), its {name} slots are
// filled where the code is raised, a slot without a value is a bug, the feed check counts exactly the codes
// the table marks, and the README's list of warnings is the table's.

import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { WARNINGS, type WarningCode } from '../../src/common/warningCodes.js';
import { WarningSink, warningText } from '../../src/common/warnings.js';
import { checkFeed } from '../../src/check/check.js';
import { buildFeed, cleanSpec } from '../helpers/buildFeed.js';

const ROOT = join(import.meta.dirname, '..', '..');
const CODES = Object.keys(WARNINGS) as WarningCode[];
const TODAY = '2026-10-14';

function sources(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const e of readdirSync(dir, { withFileTypes: true, recursive: true })) {
    if (e.isFile() && e.name.endsWith('.ts')) {
      const p = join(e.parentPath, e.name);
      out.set(relative(ROOT, p), readFileSync(p, 'utf8'));
    }
  }
  return out;
}

describe('the warning table', () => {
  const src = sources(join(ROOT, 'src'));
  src.delete(join('src', 'common', 'warningCodes.ts'));
  const all = [...src.values()].join('\n');

  it('has no code that nothing raises', () => {
    const dead = CODES.filter((c) => !all.includes(`'${c}'`));
    expect(dead).toEqual([]);
  });

  it('has kebab-case codes, a title and one line of explanation for each', () => {
    for (const c of CODES) {
      expect(c).toMatch(/^[a-z0-9]+(-[a-z0-9]+)*$/);
      expect(WARNINGS[c].title.length, c).toBeGreaterThan(3);
      expect(WARNINGS[c].explanation, c).not.toMatch(/\n/);
    }
  });

  it('fills the slots from the values given, the first time a code is raised', () => {
    const sink = new WarningSink(2);
    sink.add('shape-dist-unit-poor-fit', undefined, 1, { unit: 'km', misfitPct: '12.5' });
    sink.add('shape-dist-unit-poor-fit', 'a', 2, { unit: 'ft', misfitPct: '1.0' });
    sink.add('trip-unknown-route', 'trips.txt:4 route_id R9');
    expect(sink.list()).toEqual([
      {
        code: 'shape-dist-unit-poor-fit',
        message: 'shape_dist_traveled read as km, but shapes are 12.5 % off that on the median',
        count: 3,
        examples: ['a'],
      },
      {
        code: 'trip-unknown-route',
        message: 'trips whose route_id is not in routes.txt were dropped',
        count: 1,
        examples: ['trips.txt:4 route_id R9'],
      },
    ]);
  });

  it('refuses a slot left without a value (a bug, not a message with a hole)', () => {
    expect(() => warningText('realtime-predicted-only', {})).toThrow(/\{use\}/);
    expect(() => new WarningSink().add('mean-trip-from-counts')).toThrow(/meanTripLengthM/);
  });

  it('is counted by the feed check where it says so, and only there', () => {
    const raised = CODES.map((code, i) => ({ code, message: WARNINGS[code].explanation, count: 1, examples: [`trips.txt:${i + 2}`] }));
    const { feed, patterns } = buildFeed({ ...cleanSpec(), warnings: raised });
    const report = checkFeed(feed, patterns, { today: TODAY, maxExamples: 100 });
    const dangling = report.findings.find((f) => f.code === 'dangling-reference');
    const counted = (dangling?.examples ?? [])
      .map((e) => e.ids?.warning)
      .filter(Boolean)
      .sort();
    expect(counted).toEqual(CODES.filter((c) => WARNINGS[c].check).sort());
    expect(counted).toContain('trip-unknown-route');
    // a code that merely has "unknown" in its name is not a dangling reference
    expect(counted).not.toContain('shape-dist-unit-unknown');
  });
});

describe("the README's warnings", () => {
  it('list every code of the table, with its title, its explanation and whether check counts it, in order', () => {
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    const start = readme.indexOf('| warning | title | what it means | counted by `check` |');
    expect(start).toBeGreaterThan(0);
    const rows = readme.slice(start).split('\n').slice(2);
    const table = rows.slice(
      0,
      rows.findIndex((l) => !l.startsWith('|')),
    );
    const expected = CODES.map(
      (c) => `| \`${c}\` | ${WARNINGS[c].title} | ${WARNINGS[c].explanation.replace(/\|/g, '\\|')} | ${WARNINGS[c].check ? 'yes' : ''} |`,
    );
    expect(table).toEqual(expected);
  });
});
