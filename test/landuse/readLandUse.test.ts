// The land-use reader alone: the weights option, the default columns a file has, a MultiPoint's people
// split over its points, and the size cap on GeoJSON checked before a byte is parsed.
import { closeSync, mkdtempSync, openSync, rmSync, ftruncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { MAX_GEOJSON_BYTES, parseLandUseWeights, readLandUse } from '../../src/landuse/readLandUse.js';
import { thrown } from '../helpers/errors.js';

const tmp = mkdtempSync(join(tmpdir(), 'stopspan-landuse-read-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('--land-use-weights', () => {
  it('reads column=weight pairs, a bare name weighing 1', () => {
    expect(parseLandUseWeights('population=1, jobs=0.5,visitors')).toEqual([
      { name: 'population', weight: 1 },
      { name: 'jobs', weight: 0.5 },
      { name: 'visitors', weight: 1 },
    ]);
  });
  for (const bad of ['population=-1', 'jobs=lots', 'population=1,population=2', 'jobs=0', '=1']) {
    it(`refuses ${JSON.stringify(bad)}`, () => {
      expect(thrown(() => parseLandUseWeights(bad)).code).toBe('bad-option');
    });
  }
});

describe('readLandUse', () => {
  it('reads the default columns the file has, and splits a MultiPoint over its points', () => {
    const f = join(tmp, 'vellmoor.geojson');
    const pt = (lon: number, lat: number) => [lon, lat];
    writeFileSync(
      f,
      JSON.stringify({
        type: 'FeatureCollection',
        features: [
          {
            type: 'Feature',
            properties: { population: 90 },
            geometry: { type: 'MultiPoint', coordinates: [pt(10.03, 45.02), pt(10.031, 45.02), pt(10.032, 45.02)] },
          },
          { type: 'Feature', properties: { population: 10, jobs: 7 }, geometry: { type: 'Point', coordinates: pt(10.03, 45.021) } },
        ],
      }),
    );
    const layer = readLandUse(f);
    expect(layer.columns).toEqual([{ name: 'population', weight: 1 }]); // jobs is not on the first feature
    expect(layer.features).toBe(2);
    expect([...layer.amounts[0]]).toEqual([30, 30, 30, 10]);
    expect([...layer.featureRef]).toEqual([1, 2]);
    expect(layer.totalPeople).toBe(100);
  });

  it('refuses a GeoJSON file above the size cap before parsing it', () => {
    const f = join(tmp, 'huge.geojson');
    const fd = openSync(f, 'w');
    ftruncateSync(fd, MAX_GEOJSON_BYTES + 1); // sparse: takes no disk
    closeSync(fd);
    const e = thrown(() => readLandUse(f));
    expect(e.code).toBe('feed-too-large');
    expect(e.oneLine()).toMatch(/huge\.geojson: land-use GeoJSON file is larger than 256 MiB, the cap/);
  });

  describe('a FeatureCollection read a feature at a time reads as the whole document parsed at once', () => {
    const feat = (population: number, lon: number) =>
      `{"type":"Feature","geometry":{"type":"Point","coordinates":[${lon},45.02]},"properties":{"population":${population},"note":"a \\"quoted\\" [name] {x}"}}`;
    const write = (name: string, text: string) => {
      const f = join(tmp, name);
      writeFileSync(f, text);
      return f;
    };
    const plain = write('plain.geojson', `{"type":"FeatureCollection","features":[${feat(5, 10.03)},${feat(7, 10.031)}]}`);
    const people = (f: string) => [...readLandUse(f).amounts[0]];

    it('with other members around the features, spaces and line breaks', () => {
      const f = write(
        'members.geojson',
        `\n { "name" : "Vellmoor blocks", "features" :\n [ ${feat(5, 10.03)} ,\n\t${feat(7, 10.031)} ] , "crs": {"type": "name", "properties": {"name": "urn:ogc:def:crs:OGC:1.3:CRS84"}}, "type":"FeatureCollection" }\n`,
      );
      expect(people(f)).toEqual(people(plain));
      expect(people(f)).toEqual([5, 7]);
    });

    it('with the key written with an escape, or given twice (the last one counts, as in JSON)', () => {
      expect(people(write('escaped.geojson', `{"type":"FeatureCollection","feat\\u0075res":[${feat(5, 10.03)}]}`))).toEqual([5]);
      expect(
        people(
          write(
            'twice.geojson',
            `{"type":"FeatureCollection","features":[${feat(5, 10.03)}],"features":[${feat(9, 10.03)},${feat(1, 10.03)}]}`,
          ),
        ),
      ).toEqual([9, 1]);
    });

    it('reports a file that is not valid JSON as such even after a bad feature, and a bad feature by its number', () => {
      const broken = write('broken.geojson', `{"type":"FeatureCollection","features":[${feat(-5, 10.03)},${feat(7, 10.031)} oops]}`);
      expect(thrown(() => readLandUse(broken)).oneLine()).toMatch(/broken\.geojson: land-use file is not valid JSON/);
      const bad = write('bad.geojson', `{"type":"FeatureCollection","features":[${feat(5, 10.03)},${feat(-7, 10.031)}]}`);
      expect(thrown(() => readLandUse(bad)).oneLine()).toMatch(
        /bad\.geojson column population: feature 2: invalid population: a count cannot be negative/,
      );
    });
  });
});
