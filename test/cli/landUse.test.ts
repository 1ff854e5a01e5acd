// --land-use through the built command: each kind of bad land-use file is one error line naming the file,
// the row or feature and the field, exit 2, and no output folder; a good layer's features that touch no
// catchment are counted in summary.json, and whatif reports coverage before and after.
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT, runCli } from '../helpers/cli.js';

const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
const tmp = mkdtempSync(join(tmpdir(), 'stopspan-landuse-cli-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

// Central Square in the demo city of Vellmoor, and a point 5 km north of every stop (beyond every walk)
const CSQ = { lat: 45.020054, lon: 10.030076 };

function file(name: string, text: string): string {
  const f = join(tmp, name);
  writeFileSync(f, text);
  return f;
}

const feature = (properties: Record<string, unknown>, geometry: unknown) => ({ type: 'Feature', properties, geometry });
const collection = (...features: unknown[]) => JSON.stringify({ type: 'FeatureCollection', features });
const square = (lat: number, lon: number, d = 0.001) => [
  [
    [lon, lat],
    [lon + d, lat],
    [lon + d, lat + d],
    [lon, lat + d],
    [lon, lat],
  ],
];

const BAD: [string, string, string[], RegExp][] = [
  ['no coordinates', file('no-coords.csv', 'x,y,population,jobs\n1,2,3,4\n'), [], /no-coords\.csv:1 column lat: .*coordinates/],
  [
    'an unknown weight column',
    file('unknown.csv', `lat,lon,population,jobs\n${CSQ.lat},${CSQ.lon},10,5\n`),
    ['--land-use-weights', 'residents=1'],
    /unknown\.csv:1 column residents: .*--land-use-weights/,
  ],
  [
    'a non-numeric count',
    file('words.csv', `lat,lon,population,jobs\n${CSQ.lat},${CSQ.lon},10,5\n${CSQ.lat},${CSQ.lon},many,5\n`),
    [],
    /words\.csv:3 column population: invalid population: expected a number \(got "many"\)/,
  ],
  [
    'a negative count',
    file('negative.csv', `lat,lon,population,jobs\n${CSQ.lat},${CSQ.lon},10,-5\n`),
    [],
    /negative\.csv:2 column jobs: .*cannot be negative/,
  ],
  [
    'a ring that is not closed',
    file(
      'open.geojson',
      collection(
        feature({ population: 5, jobs: 1 }, { type: 'Point', coordinates: [CSQ.lon, CSQ.lat] }),
        feature(
          { population: 5, jobs: 1 },
          {
            type: 'Polygon',
            coordinates: [
              [
                [CSQ.lon, CSQ.lat],
                [CSQ.lon + 0.001, CSQ.lat],
                [CSQ.lon, CSQ.lat + 0.001],
                [CSQ.lon + 0.001, CSQ.lat + 0.001],
              ],
            ],
          },
        ),
      ),
    ),
    [],
    /open\.geojson column geometry: feature 2: invalid geometry: ring 1 is not closed/,
  ],
  [
    'a geometry of another kind',
    file(
      'line.geojson',
      collection(
        feature(
          { population: 5 },
          {
            type: 'LineString',
            coordinates: [
              [CSQ.lon, CSQ.lat],
              [CSQ.lon + 0.01, CSQ.lat],
            ],
          },
        ),
      ),
    ),
    [],
    /line\.geojson column geometry: feature 1: invalid geometry: expected Point, MultiPoint, Polygon or MultiPolygon/,
  ],
  [
    'a feature without its property',
    file(
      'lacks.geojson',
      collection(
        feature({ population: 5, jobs: 2 }, { type: 'Point', coordinates: [CSQ.lon, CSQ.lat] }),
        feature({ population: 5 }, { type: 'Point', coordinates: [CSQ.lon, CSQ.lat] }),
      ),
    ),
    [],
    /lacks\.geojson column jobs: feature 2: lacks the property jobs/,
  ],
  [
    'latitude and longitude swapped',
    file('swapped.csv', `lat,lon,population,jobs\n${CSQ.lat},${CSQ.lon},10,5\n${CSQ.lon},${CSQ.lat},10,5\n`),
    [],
    /swapped\.csv:3 column lat: coordinates 25 km or more from every stop/,
  ],
];

describe('stopspan audit --land-use with a bad file', () => {
  for (const [what, path, extra, message] of BAD) {
    it(`refuses ${what}: one line naming file, row or feature and field, exit 2, nothing written`, async () => {
      const out = join(tmp, `out-${what.replace(/\W+/g, '-')}`);
      const r = await runCli(['audit', DEMO, '--land-use', path, ...extra, '--out', out, '-q']);
      expect(r.code, r.stderr).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(/^error: /);
      expect(lines[0]).toMatch(message);
      expect(existsSync(out)).toBe(false);
    });
  }

  it('refuses --land-use-weights that name no weight above 0, before reading anything', async () => {
    const r = await runCli(['audit', DEMO, '--land-use', BAD[1][1], '--land-use-weights', 'population=0', '--out', join(tmp, 'w0'), '-q']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toMatch(/^error: invalid option --land-use-weights: name at least one column with a weight above 0/);
  });

  it('refuses the same bad file in whatif', async () => {
    const r = await runCli(['whatif', DEMO, '--remove', 'CSQ', '--land-use', BAD[3][1], '-q']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toMatch(/negative\.csv:2 column jobs/);
  });
});

describe('stopspan audit --land-use with a good file', () => {
  it('counts the features that touch no catchment in summary.json and marks the demand land-use', async () => {
    const layer = file(
      'good.geojson',
      collection(
        feature({ population: 800, jobs: 200 }, { type: 'Polygon', coordinates: square(CSQ.lat - 0.0005, CSQ.lon - 0.0005) }),
        feature(
          { population: 50, jobs: 0 },
          {
            type: 'MultiPoint',
            coordinates: [
              [CSQ.lon + 0.0003, CSQ.lat],
              [CSQ.lon - 0.0003, CSQ.lat],
            ],
          },
        ),
        feature({ population: 120, jobs: 30 }, { type: 'Point', coordinates: [CSQ.lon, CSQ.lat + 0.045] }),
      ),
    );
    const out = join(tmp, 'good-out');
    const r = await runCli(['audit', DEMO, '--land-use', layer, '--out', out, '-q']);
    expect(r.code, r.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.demand_source).toBe('land-use');
    expect(summary.land_use.features).toBe(3);
    expect(summary.land_use.features_outside_catchments).toBe(1);
    expect(summary.land_use.people).toBe(1200);
    expect(summary.land_use.people_covered).toBe(1050);
    const patterns = readFileSync(join(out, 'patterns.csv'), 'utf8').split(/\r?\n/);
    expect(patterns[0].split(',').at(-1)).toBe('people_covered');
    expect(readFileSync(join(out, 'candidates.csv'), 'utf8').split(/\r?\n/)[0].split(',').at(-1)).toBe('people_left_uncovered');
    const page = join(tmp, 'whatif-page');
    const w = await runCli(['whatif', DEMO, '--remove', 'MKT-12-a', '--land-use', layer, '--out', page, '-q']);
    expect(w.code, w.stderr).toBe(0);
    expect(w.stdout).toMatch(/land use: 1,050 of 1,200 people within a walk of a stop before, [\d,]+ after/);
    expect(readFileSync(join(page, 'index.html'), 'utf8')).toMatch(
      /Land use: 1,050 of 1,200 people within a walk of a stop before the change, [\d,]+ after\./,
    );
    expect(JSON.parse(readFileSync(join(page, 'result.json'), 'utf8')).land_use.people_covered_before).toBe(1050);
  });
});
