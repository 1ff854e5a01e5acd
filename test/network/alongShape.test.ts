// Forward projection of stops onto a shape: loops, out-and-back streets and figure-eights never snap a
// stop backwards, and the work stays about the shape's length.

import { describe, it, expect } from 'vitest';
import { lineString, point } from '@turf/helpers';
import { nearestPointOnLine } from '@turf/nearest-point-on-line';
import { prepareShape, projectAlongShape } from '../../src/network/alongShape.js';
import { at, line } from '../helpers/handFeed.js';

function shapeOf(xy: [number, number][]) {
  const pts = xy.map(([x, y]) => at(x, y));
  return prepareShape({ lat: pts.map((p) => p.lat), lon: pts.map((p) => p.lon) });
}
const stopsAt = (xy: [number, number][]) => xy.map(([x, y]) => at(x, y));
/** Index of the shape point closest to (x, y) among indices >= from. */
function pointIndex(xy: [number, number][], x: number, y: number, from = 0): number {
  let best = from;
  for (let i = from; i < xy.length; i++)
    if (Math.hypot(xy[i][0] - x, xy[i][1] - y) < Math.hypot(xy[best][0] - x, xy[best][1] - y) - 1e-9) best = i;
  return best;
}

describe('projectAlongShape', () => {
  it('measures stops on a straight street from the shape start, with their offsets', () => {
    const xy = line(0, 0, 2000, 0);
    const shape = shapeOf(xy);
    const r = projectAlongShape(
      shape,
      stopsAt([
        [0, 8],
        [400, -8],
        [1250, 12],
        [2000, 8],
      ]),
    );
    // Positions: 0, 400, 1250, 2000 m of a 2000 m street (the local frame is exact to well under 0.1 %).
    expect(r.distAlongM.map((d) => Math.round(d))).toEqual([0, 400, 1250, 2000]);
    expect(r.offsetM.map((d) => Math.round(d))).toEqual([8, 8, 12, 8]);
    expect(shape.lengthM).toBeCloseTo(2000, -1);
  });

  it('follows a loop to its end: the last stop at the start point is at the full length', () => {
    // A 500 m square loop, starting and ending at the same corner.
    const xy = [
      ...line(0, 0, 500, 0),
      ...line(500, 0, 500, 500).slice(1),
      ...line(500, 500, 0, 500).slice(1),
      ...line(0, 500, 0, 0).slice(1),
    ];
    const shape = shapeOf(xy);
    const r = projectAlongShape(
      shape,
      stopsAt([
        [0, 0],
        [250, -5],
        [505, 250],
        [250, 505],
        [-5, 250],
        [0, 0],
      ]),
    );
    const L = shape.lengthM;
    expect(r.distAlongM[0]).toBeCloseTo(0, 6);
    expect(r.distAlongM[5]).toBeCloseTo(L, 6);
    expect(r.distAlongM.map((d) => Math.round((d / L) * 8))).toEqual([0, 1, 3, 5, 7, 8]);
  });

  it('places the inbound stops of an out-and-back street on the way back, not on the way out', () => {
    // Out 2 km east and back on the very same points; stops on both legs share coordinates.
    const out = line(0, 0, 2000, 0);
    const xy = [...out, ...[...out].reverse().slice(1)];
    const shape = shapeOf(xy);
    const legs: [number, number][] = [
      [0, 0],
      [500, 0],
      [1000, 0],
      [1500, 0],
      [2000, 0],
      [1500, 0],
      [1000, 0],
      [500, 0],
      [0, 0],
    ];
    const r = projectAlongShape(shape, stopsAt(legs));
    const L = shape.lengthM; // about 4000 m
    expect(r.distAlongM.map((d) => Math.round((d / L) * 8))).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8]);
    for (let i = 1; i < r.distAlongM.length; i++) expect(r.distAlongM[i] - r.distAlongM[i - 1]).toBeGreaterThan(490);
  });

  it('also keeps an inbound-only pattern on the inbound leg once a stop has passed the turn', () => {
    const out = line(0, 0, 1000, 0);
    const xy = [...out, ...line(1000, 0, 1000, 20).slice(1), ...line(1000, 20, 0, 20).slice(1)];
    const shape = shapeOf(xy);
    // Far end first, then stops on the return side of the street (20 m north).
    const r = projectAlongShape(
      shape,
      stopsAt([
        [1000, 10],
        [700, 22],
        [300, 22],
      ]),
    );
    expect(r.distAlongM[1] - r.distAlongM[0]).toBeGreaterThan(250);
    expect(r.distAlongM[2] - r.distAlongM[1]).toBeCloseTo(400, -1);
  });

  it('passes a figure-eight crossing twice, once per lobe', () => {
    // Two circles of radius 300 m meeting at the centre; the shape starts at the centre, runs the west
    // lobe, crosses the centre, runs the east lobe and returns to the centre.
    const r0 = 300;
    const lobe = (cx: number, sign: number): [number, number][] =>
      Array.from({ length: 73 }, (_, k) => {
        const a = (k / 72) * 2 * Math.PI;
        return [cx + sign * r0 * Math.cos(a), r0 * Math.sin(a)] as [number, number];
      });
    const west = lobe(-r0, 1); // starts at (0, 0) and goes round the west circle
    const east = lobe(r0, -1); // starts at (0, 0) and goes round the east circle
    const xy = [...west, ...east.slice(1)];
    const shape = shapeOf(xy);
    const r = projectAlongShape(
      shape,
      stopsAt([
        [0, 0],
        [-2 * r0, 0],
        [0, 0],
        [2 * r0, 0],
        [0, 0],
      ]),
    );
    const expected = [0, pointIndex(xy, -2 * r0, 0), 72, pointIndex(xy, 2 * r0, 0, 72), xy.length - 1].map((i) => shape.cumM[i]);
    r.distAlongM.forEach((d, i) => expect(d).toBeCloseTo(expected[i], 3));
  });

  it('never goes backwards, even for a stop that lies behind the previous one', () => {
    const shape = shapeOf(line(0, 0, 1000, 0));
    const r = projectAlongShape(
      shape,
      stopsAt([
        [600, 5],
        [400, 5],
        [900, 5],
      ]),
    );
    expect(r.distAlongM[1]).toBeGreaterThanOrEqual(r.distAlongM[0]);
    expect(r.distAlongM[1]).toBeCloseTo(600, 0);
    expect(r.distAlongM[2]).toBeCloseTo(900, 0);
  });

  it('searches the rest of the shape when nothing near lies within the look-ahead window', () => {
    // Out 1.3 km along a street and back 200 m to the north. The look-ahead window from the first stop
    // is 500 m of shape (the chord to the next stop is short), well short of the return leg.
    const xy = [...line(0, 0, 1300, 0), ...line(1300, 0, 1300, 200).slice(1), ...line(1300, 200, 100, 200).slice(1)];
    const shape = shapeOf(xy);
    // The second stop lies 200 m north of the first: the chord is short, but along the shape it is about 2.5 km
    // ahead; it is 200 m from the outbound leg and 0 m from the inbound leg.
    const r = projectAlongShape(
      shape,
      stopsAt([
        [100, 0],
        [100, 200],
      ]),
      { minLookAheadM: 500, lookAheadFactor: 2 },
    );
    expect(r.fallbacks).toBe(1);
    expect(r.distAlongM[1]).toBeCloseTo(shape.lengthM, 0);
    expect(r.offsetM[1]).toBeLessThan(1);
  });

  it('prefers a much closer pass later in the window to a loose first pass', () => {
    // The shape passes 15 m south of the stop, turns north and comes back through the stop itself
    // about 400 m later (a jog around a block): the second pass is the stop's place.
    const xy = [
      ...line(0, 0, 600, 0),
      ...line(600, 0, 600, 15).slice(1),
      ...line(600, 15, 350, 15).slice(1),
      ...line(350, 15, 350, 100).slice(1),
    ];
    const shape = shapeOf(xy);
    const r = projectAlongShape(
      shape,
      stopsAt([
        [0, 0],
        [400, 15],
      ]),
    );
    expect(r.offsetM[1]).toBeLessThan(0.5);
    expect(r.distAlongM[1]).toBeCloseTo(600 + 15 + 200, 0);
  });

  it('keeps an earlier pass when a later one is only a little closer (within the slack)', () => {
    // Same street both ways, the return 8 m north; a stop 5 m north of the outbound line, then the turn.
    const xy = [...line(0, 0, 600, 0), ...line(600, 0, 600, 8).slice(1), ...line(600, 8, 0, 8).slice(1)];
    const shape = shapeOf(xy);
    const r = projectAlongShape(
      shape,
      stopsAt([
        [0, 0],
        [500, 5],
      ]),
    );
    expect(r.distAlongM[1]).toBeCloseTo(500, 0);
  });

  it('follows a terminal loop longer than the window to the far pass of a stop', () => {
    // The bus runs 200 m east, then a 1.6 km loop north and back to a stop 140 m north of the street
    // it left; the straight line between the two stops is short, the path is long.
    const xy = [
      ...line(0, 0, 200, 0),
      ...line(200, 0, 200, 800).slice(1),
      ...line(200, 800, 300, 800).slice(1),
      ...line(300, 800, 300, 140).slice(1),
      ...line(300, 140, 260, 140).slice(1),
    ];
    const shape = shapeOf(xy);
    const r = projectAlongShape(
      shape,
      stopsAt([
        [100, 0],
        [260, 140],
      ]),
    );
    expect(r.fallbacks).toBe(1);
    expect(r.offsetM[1]).toBeLessThan(0.5);
    expect(r.distAlongM[1]).toBeCloseTo(shape.lengthM, 0);
  });

  it('agrees with turf nearestPointOnLine on a winding street without ambiguity', () => {
    // A sine-shaped street 3 km long; stops 10 m to its side every 250 m.
    const xy: [number, number][] = Array.from({ length: 301 }, (_, i) => [i * 10, 80 * Math.sin(i / 30)]);
    const shape = shapeOf(xy);
    const stopXY: [number, number][] = Array.from({ length: 12 }, (_, k) => {
      const x = 100 + k * 250;
      return [x, 80 * Math.sin(x / 300) + 10];
    });
    const r = projectAlongShape(shape, stopsAt(stopXY));
    // Reference: @turf/nearest-point-on-line (searches the whole line; `location` in km along the line,
    // haversine on the same 6 371 008.8 m sphere).
    const lineGeo = lineString(xy.map(([x, y]) => [at(x, y).lon, at(x, y).lat]));
    stopXY.forEach(([x, y], k) => {
      const p = at(x, y);
      const ref = nearestPointOnLine(lineGeo, point([p.lon, p.lat]), { units: 'kilometers' });
      expect(Math.abs(r.distAlongM[k] - ref.properties.location * 1000)).toBeLessThan(1);
      expect(Math.abs(r.offsetM[k] - ref.properties.dist * 1000)).toBeLessThan(0.5);
    });
  });

  it('does work proportional to the shape length, not stops times shape points', () => {
    // 20 km at 10 m per point (2000 segments), 81 stops every 250 m.
    const xy = line(0, 0, 20000, 0);
    const shape = shapeOf(xy);
    const stops = stopsAt(Array.from({ length: 81 }, (_, k) => [k * 250, 6] as [number, number]));
    const r = projectAlongShape(shape, stops);
    const nSeg = xy.length - 1;
    expect(r.distAlongM[80]).toBeCloseTo(20000, -1);
    // The window is 2.5 times the 250 m chord, so about 2.5 times the shape; a whole-line search per
    // stop would be 81 * 2000 = 162 000 segments.
    expect(r.segmentsVisited).toBeLessThan(3 * nSeg);
    expect(r.fallbacks).toBe(0);
  });

  it('bounds the extra search when every stop is far from its shape', () => {
    // A shape drawn 80 m off the street: every stop triggers the search beyond the window, which stops
    // 3 km on (fallbackLookAheadM), so the work stays a bounded multiple of the shape.
    const xy = line(0, 0, 20000, 0);
    const shape = shapeOf(xy);
    const r = projectAlongShape(shape, stopsAt(Array.from({ length: 81 }, (_, k) => [k * 250, 80] as [number, number])));
    expect(r.fallbacks).toBeGreaterThanOrEqual(79); // all but the last, whose window reaches the end
    r.distAlongM.forEach((d, k) => expect(Math.abs(d - k * 250)).toBeLessThan(1));
    expect(r.segmentsVisited).toBeLessThan(15 * (xy.length - 1));
  });

  it('rejects a bad option, naming it', () => {
    const shape = shapeOf(line(0, 0, 100, 0));
    expect(() => projectAlongShape(shape, [], { slackM: -1 })).toThrow(/slackM/);
  });
});
