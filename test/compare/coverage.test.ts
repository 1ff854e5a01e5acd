// compare with a land-use layer (--land-use): both versions audited with the one layer, and the people
// within a walk of a stop served before and after. Hand-made Vellmoor streets where the newer version stops
// serving one stop: the people beside it alone are left uncovered, counted here by hand.
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import Ajv2020 from 'ajv/dist/2020.js';
import { auditBrief, compareFeeds } from '../../src/compare/compare.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { readLandUse } from '../../src/landuse/readLandUse.js';
import { WALK_REACH_M } from '../../src/model/walkReach.js';
import { EARTH_RADIUS_M } from '../../src/network/geodesy.js';
import { comparisonHtml, comparisonText } from '../../src/report/compareRender.js';
import { buildFeed, street } from '../helpers/buildFeed.js';
import { ROOT, runCli } from '../helpers/cli.js';

const work = mkdtempSync(join(tmpdir(), 'stopspan-compare-coverage-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

// [D] metres north as degrees of latitude on the sphere the project measures on: 180 / (pi R) per metre
const north = (m: number): number => (m * 180) / (Math.PI * EARTH_RADIUS_M);

/**
 * The layer, by hand, beside a street of stops 400 m apart (S1, S2, S3 ... at 0, 400, 800 m east):
 *   - 20 m north of S3: 200 residents and 100 jobs (300 people). S3 is 20 m away; S2 and S4 are
 *     sqrt(400^2 + 20^2) = 400.5 m away [D], beyond the straight-line reach of a walk, 400 / 1.3 = 307.7 m.
 *   - 20 m north of S1: 400 residents and 100 jobs (500 people), S1 served in both versions.
 *   - 1 km north of S2: 40 residents, beyond every stop's walk in both versions.
 * Before (S1 to S5 served): 300 + 500 = 800 people covered (600 residents, 200 jobs). After (S3 no longer
 * served): 500 (400 residents, 100 jobs). Change: -300 (-200 residents, -100 jobs). Total 840 people.
 */
function layerCsv(
  name: string,
  s1: { lat: number; lon: number },
  s2: { lat: number; lon: number },
  s3: { lat: number; lon: number },
): string {
  const f = join(work, `${name}.csv`);
  const row = (p: { lat: number; lon: number }, dNorthM: number, population: number, jobs: number) =>
    `${(p.lat + north(dNorthM)).toFixed(7)},${p.lon.toFixed(7)},${population},${jobs}\n`;
  writeFileSync(f, 'lat,lon,population,jobs\n' + row(s3, 20, 200, 100) + row(s1, 20, 400, 100) + row(s2, 1000, 40, 0));
  return f;
}

describe('compare: coverage before and after from one land-use layer', () => {
  it('counts the people left beyond every walk when a stop is no longer served', () => {
    expect(WALK_REACH_M).toBeLessThan(Math.hypot(400, 20)); // the hand count above stands on this
    const stops = street(5, 400);
    const times = (ids: string[]) => ids.map((s, k) => [s, 28800 + 60 * k, 28800 + 60 * k] as [string, number, number]);
    const ids = stops.map((s) => s.id);
    const trips = (served: string[]) =>
      [1, 2, 3, 4].map((k) => ({
        id: `t${k}`,
        routeId: 'R1',
        times: times(served).map(([s, a, d]) => [s, a + 3600 * k, d + 3600 * k] as [string, number, number]),
      }));
    const old = buildFeed({ stops, trips: trips(ids) });
    const neu = buildFeed({ stops, trips: trips(ids.filter((s) => s !== 'S3')) });
    const layer = readLandUse(layerCsv('street-layer', stops[0], stops[1], stops[2]));
    const audits = {
      old: auditBrief(runAudit(old.feed, old.patterns, { landUse: layer })),
      new: auditBrief(runAudit(neu.feed, neu.patterns, { landUse: layer })),
    };
    const c = compareFeeds(old.feed, neu.feed, old.patterns, neu.patterns, { audits });
    expect(c.coverage).not.toBeNull();
    const v = c.coverage!;
    expect(v.people).toBeCloseTo(840, 9);
    expect(v.before).toBeCloseTo(800, 9);
    expect(v.after).toBeCloseTo(500, 9);
    expect(v.change).toBeCloseTo(-300, 9);
    expect(v.columns.map((x) => [x.name, x.total, x.before, x.after, x.change])).toEqual([
      ['population', 640, 600, 400, -200],
      ['jobs', 200, 200, 100, -100],
    ]);
    const text = comparisonText(c);
    expect(text).toMatch(/coverage: people within a 400 m walk of a stop served \(land use .*street-layer\.csv, 840 people in all\)/);
    expect(text).toMatch(/people covered\s+800\s+500\s+-300\n/);
    expect(text).toMatch(/ {2}population\s+600\s+400\s+-200\n/);
    expect(comparisonHtml(c)).toContain('<tr><td>people</td><td>840</td><td>800</td><td>500</td><td>-300</td></tr>');
    // without the layer on either side, nothing is said of coverage
    const plain = compareFeeds(old.feed, neu.feed, old.patterns, neu.patterns, {
      audits: { old: auditBrief(runAudit(old.feed, old.patterns)), new: audits.new },
    });
    expect(plain.coverage).toBeNull();
    expect(comparisonText(plain)).not.toContain('coverage:');
  });
});

describe('stopspan compare --land-use', () => {
  // the check fixtures' clean street: S1 to S5, 400 m apart along latitude 52.37; the newer version skips S3
  const CLEAN = join(ROOT, 'fixtures/check/clean');
  const neu = join(work, 'without-s3');
  cpSync(CLEAN, neu, { recursive: true });
  const stopTimes = readFileSync(join(CLEAN, 'stop_times.txt'), 'utf8');
  writeFileSync(
    join(neu, 'stop_times.txt'),
    stopTimes
      .split('\n')
      .filter((l) => !l.includes(',S3,'))
      .join('\n'),
  );
  const at = (lon: number) => ({ lat: 52.37, lon });
  const layer = layerCsv('clean-layer', at(4.9), at(4.9058918), at(4.9117835));

  it('audits both versions with the layer and reports the people covered before and after in the text, the page and the JSON', async () => {
    const out = join(work, 'out');
    const r = await runCli(['compare', CLEAN, neu, '--land-use', layer, '--json', '--out', out, '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    // the document meets its published schema (JSON Schema 2020-12 [C], checked by ajv)
    const validate = new Ajv2020.default({ allErrors: true, strict: true, allowUnionTypes: true, validateFormats: false }).compile(
      JSON.parse(readFileSync(join(ROOT, 'schema/compare.schema.json'), 'utf8')),
    );
    validate(doc);
    expect(validate.errors ?? []).toEqual([]);
    expect(doc.coverage).toMatchObject({ walk_radius_m: 400, people: 840, before: 800, after: 500, change: -300 });
    expect(doc.coverage.columns).toEqual([
      { name: 'population', weight: 1, total: 640, before: 600, after: 400, change: -200 },
      { name: 'jobs', weight: 1, total: 200, before: 200, after: 100, change: -100 },
    ]);
    expect(JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8')).coverage).toEqual(doc.coverage);
    expect(readFileSync(join(out, 'compare.html'), 'utf8')).toContain('<h2>Coverage before and after</h2>');
    // the weights apply to both sides: jobs alone, at 2 each
    const text = await runCli(['compare', CLEAN, neu, '--land-use', layer, '--land-use-weights', 'jobs=2', '--quiet']);
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(/people covered\s+400\s+200\s+-200\n/);
    // without --land-use the document says null
    const plain = JSON.parse((await runCli(['compare', CLEAN, neu, '--json'])).stdout);
    expect(plain.coverage).toBeNull();
  });

  it('refuses --land-use with --no-audit, and --land-use-weights without --land-use, with one line', async () => {
    const a = await runCli(['compare', CLEAN, neu, '--land-use', layer, '--no-audit']);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/^error: option --land-use needs the audits: leave out --no-audit/);
    const b = await runCli(['compare', CLEAN, neu, '--land-use-weights', 'jobs=1']);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/^error: option --land-use-weights needs --land-use/);
  });
});
