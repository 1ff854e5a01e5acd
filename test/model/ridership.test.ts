// The ridership file: what it accepts, what is an error (with file, line, column, value) and what is a
// counted warning.
import { describe, expect, it } from 'vitest';
import { parse as csvParse } from 'csv-parse/sync';
import { StopspanError } from '../../src/common/errors.js';
import { WarningSink } from '../../src/common/warnings.js';
import { parseRidership } from '../../src/model/ridership.js';
import { ridershipDemand } from '../../src/model/demand.js';
import { handmadeNetwork } from '../helpers/handmade.js';

const { feed, patterns } = handmadeNetwork();

function err(text: string): StopspanError {
  try {
    parseRidership(text, feed, { file: 'r.csv', warnings: new WarningSink() });
  } catch (e) {
    if (e instanceof StopspanError) return e;
    throw e;
  }
  throw new Error('expected an error');
}

describe('parseRidership', () => {
  it('reads stop-level rows, optionally per route and direction, as csv-parse reads them', () => {
    const text = 'stop_id,route_id,direction_id,boardings,alightings\r\n"v1-0",V1,0,120,0\r\nv1-1,V1,0,"40.5",10\r\nv1-2,,,7,3\r\n';
    const w = new WarningSink();
    const r = parseRidership(text, feed, { file: 'r.csv', warnings: w });
    // reference: csv-parse (the project's reference CSV reader) on the same text
    const ref = csvParse(text, { columns: true }) as Record<string, string>[];
    expect(r.rows.map((x) => [x.stopId, x.boardingsPerDay, x.alightingsPerDay])).toEqual(ref.map((x) => [x.stop_id, Number(x.boardings), Number(x.alightings)]));
    expect(r.rows[0]).toMatchObject({ routeId: 'V1', directionId: 0, line: 2 });
    expect(r.rows[2]).toMatchObject({ routeId: null, directionId: null });
    expect(w.list()).toEqual([]);
  });
  it('errors on a missing column, naming it', () => {
    const e = err('stop_id,boardings\nv1-0,3\n');
    expect(e.code).toBe('bad-ridership');
    expect(e.context).toMatchObject({ file: 'r.csv', line: 1, column: 'alightings' });
  });
  it('errors on negative or non-numeric counts with line, column and value', () => {
    const e = err('stop_id,boardings,alightings\nv1-0,3,1\nv1-1,-2,1\n');
    expect(e.context).toMatchObject({ file: 'r.csv', line: 3, column: 'boardings', value: '-2' });
    expect(err('stop_id,boardings,alightings\nv1-0,3,lots\n').context).toMatchObject({ line: 2, column: 'alightings', value: 'lots' });
    expect(err('stop_id,boardings,alightings\nv1-0,,1\n').context).toMatchObject({ line: 2, column: 'boardings' });
  });
  it('errors on duplicated rows and on a stop given both with and without a route', () => {
    const d = err('stop_id,boardings,alightings\nv1-0,3,1\nv1-0,3,1\n');
    expect(d.message).toMatch(/duplicate ridership row for stop v1-0 \(first on line 2\)/);
    expect(d.context.line).toBe(3);
    const mixed = err('stop_id,route_id,boardings,alightings\nv1-5,,3,1\nv1-5,V1,3,1\n');
    expect(mixed.message).toMatch(/both for all routes and per route/);
  });
  it('counts unknown stops and routes as warnings and skips those rows', () => {
    const w = new WarningSink();
    const r = parseRidership('stop_id,route_id,boardings,alightings\nnowhere,V1,3,1\nv1-1,V9,3,1\nv1-2,V1,3,1\n', feed, { file: 'r.csv', warnings: w });
    expect(r.rows.length).toBe(1);
    expect(w.list().map((x) => [x.code, x.count])).toEqual([
      ['ridership-unknown-stop', 1],
      ['ridership-unknown-route', 1],
    ]);
  });
});

describe('ridershipDemand', () => {
  const layouts = patterns.patterns.map((pattern) => ({ pattern, modelStops: pattern.stopIdx.map((_, j) => j), posM: pattern.distAlongM }));
  it('splits a stop shared by two routes by trips per day and builds the load profile', () => {
    const w = new WarningSink();
    const text = 'stop_id,boardings,alightings\n' + patterns.patterns[0].stopIdx.map((s, j) => `${feed.stops[s].id},${j < 11 ? 20 : 0},${j > 0 ? 20 : 0}`).join('\n') + '\nv2-n,10,0\nv2-s,0,10\n';
    const d = ridershipDemand(parseRidership(text, feed, { file: 'r.csv', warnings: w }), layouts, { warnings: w });
    const v1 = d.get('V1:0:1')!;
    const v2 = d.get('V2:0:1')!;
    // shared stop v1-5: 60 of 80 trips on V1
    expect(v1.boardPerDay[5]).toBeCloseTo(20 * (60 / 80), 9);
    expect(v2.boardPerDay[1]).toBeCloseTo(20 * (20 / 80), 9);
    expect(v1.demandSource).toBe('observed');
    expect(v1.loadDepartingPerDay[0]).toBeCloseTo(20, 9);
    expect(v1.loadDepartingPerDay[11]).toBe(0);
    expect(v1.ridersPerDay).toBeGreaterThan(0);
  });
  it('scales unbalanced alightings, warns, and gives stops without rows zero', () => {
    const w = new WarningSink();
    const d = ridershipDemand(parseRidership('stop_id,route_id,boardings,alightings\nv1-0,V1,100,0\nv1-11,V1,0,50\n', feed, { file: 'r.csv', warnings: w }), layouts, { warnings: w });
    const v1 = d.get('V1:0:1')!;
    expect(v1.alightPerDay[11]).toBeCloseTo(100, 9);
    expect(v1.meanTripLengthM).toBeCloseTo(1700, 9);
    expect(w.list().map((x) => x.code).sort()).toEqual(['ridership-stop-missing', 'ridership-unbalanced']);
  });
});
