// Forward projection on the tricky shapes (loop, out-and-back, figure-eight), pinned as GeoJSON files a
// reviewer can open in a map: fixtures/network/<case>.geojson holds the shape, the stops and, for each
// stop, the projected point with its distance along and offset (rounded to 0.1 m).
// Regenerate with STOPSPAN_REGENERATE=1 npx vitest run test/network/projectionFixtures.test.ts

import { describe, it, expect } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { prepareShape, projectAlongShape } from '../../src/network/alongShape.js';
import { at, line } from '../helpers/handFeed.js';

const DIR = resolve(__dirname, '../../fixtures/network');
const REGENERATE = process.env.STOPSPAN_REGENERATE === '1';

const out = line(0, 0, 1500, 0, 25);
const lobe = (cx: number, sign: number): [number, number][] =>
  Array.from(
    { length: 49 },
    (_, k) => [cx + sign * 250 * Math.cos((k / 48) * 2 * Math.PI), 250 * Math.sin((k / 48) * 2 * Math.PI)] as [number, number],
  );

const CASES: Record<string, { shape: [number, number][]; stops: [number, number][] }> = {
  // A square loop from a corner back to it, stops on the outside of each side.
  loop: {
    shape: [
      ...line(0, 0, 600, 0, 25),
      ...line(600, 0, 600, 600, 25).slice(1),
      ...line(600, 600, 0, 600, 25).slice(1),
      ...line(0, 600, 0, 0, 25).slice(1),
    ],
    stops: [
      [-4, -4],
      [300, -6],
      [606, 200],
      [606, 450],
      [300, 606],
      [-6, 300],
      [-4, -4],
    ],
  },
  // Out and back on the same points, stops at the same places both ways.
  'out-and-back': {
    shape: [...out, ...[...out].reverse().slice(1)],
    stops: [
      [0, 5],
      [500, 5],
      [1000, 5],
      [1500, 5],
      [1000, 5],
      [500, 5],
      [0, 5],
    ],
  },
  // West lobe then east lobe through the centre, a stop at the crossing on each pass.
  'figure-eight': {
    shape: [...lobe(-250, 1), ...lobe(250, -1).slice(1)],
    stops: [
      [0, 0],
      [-250, 255],
      [-500, 0],
      [-250, -255],
      [0, 0],
      [250, 255],
      [500, 0],
      [250, -255],
      [0, 0],
    ],
  },
};

const lonLat = ([x, y]: [number, number]) => {
  const p = at(x, y);
  return [Math.round(p.lon * 1e7) / 1e7, Math.round(p.lat * 1e7) / 1e7];
};

function render(name: string): object {
  const c = CASES[name];
  const pts = c.shape.map(([x, y]) => at(x, y));
  const shape = prepareShape({ lat: pts.map((p) => p.lat), lon: pts.map((p) => p.lon) });
  const r = projectAlongShape(
    shape,
    c.stops.map(([x, y]) => at(x, y)),
  );
  return {
    type: 'FeatureCollection',
    features: [
      {
        type: 'Feature',
        properties: { role: 'shape', stroke: '#3366cc', length_m: Math.round(shape.lengthM * 10) / 10 },
        geometry: { type: 'LineString', coordinates: c.shape.map(lonLat) },
      },
      ...c.stops.map((xy, i) => ({
        type: 'Feature',
        properties: {
          role: 'stop',
          stop_index: i,
          dist_along_m: Math.round(r.distAlongM[i] * 10) / 10,
          offset_m: Math.round(r.offsetM[i] * 10) / 10,
          'marker-color': '#cc3333',
        },
        geometry: { type: 'Point', coordinates: lonLat(xy) },
      })),
    ],
  };
}

describe('projection fixtures', () => {
  for (const name of Object.keys(CASES)) {
    it(`matches fixtures/network/${name}.geojson`, () => {
      const file = join(DIR, `${name}.geojson`);
      const got = render(name);
      if (REGENERATE) writeFileSync(file, JSON.stringify(got, null, 1) + '\n');
      expect(existsSync(file), `${file} is missing; regenerate it`).toBe(true);
      expect(got).toEqual(JSON.parse(readFileSync(file, 'utf8')));
    });

    it(`places the ${name} stops in order, each gap at least the straight line less the offsets`, () => {
      const fc = render(name) as { features: { properties: { role: string; dist_along_m: number; offset_m: number } }[] };
      const stops = fc.features.filter((f) => f.properties.role === 'stop').map((f) => f.properties);
      const xy = CASES[name].stops;
      for (let i = 1; i < stops.length; i++) {
        const chord = Math.hypot(xy[i][0] - xy[i - 1][0], xy[i][1] - xy[i - 1][1]);
        expect(stops[i].dist_along_m - stops[i - 1].dist_along_m).toBeGreaterThanOrEqual(
          chord - stops[i].offset_m - stops[i - 1].offset_m - 0.5,
        );
      }
      const length = (fc.features[0].properties as unknown as { length_m: number }).length_m;
      expect(stops[stops.length - 1].dist_along_m).toBeCloseTo(length, 0); // every case ends where it began
    });
  }
});
