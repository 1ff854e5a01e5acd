// The ridership file: what it accepts, what is an error (with file, line, column, value) and what is a
// counted warning.
import { describe, expect, it } from 'vitest';
import { parse as csvParse } from 'csv-parse/sync';
import { StopspanError } from '../../src/common/errors.js';
import { WarningSink } from '../../src/common/warnings.js';
import { closeSync, mkdtempSync, openSync, rmSync, statSync, truncateSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadRidership, MAX_RIDERSHIP_ROWS, parseRidership } from '../../src/model/ridership.js';
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
    expect(r.rows.map((x) => [x.stopId, x.boardingsPerDay, x.alightingsPerDay])).toEqual(
      ref.map((x) => [x.stop_id, Number(x.boardings), Number(x.alightings)]),
    );
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
  it('errors on counts that are not decimal, which Number() would read as 10', () => {
    // [C] GTFS Schedule reference, Field Types: numbers are decimal; ECMA-262 StringToNumber reads 0x0A as 10
    for (const v of ['0x0A', '0b1010', '0o12', '" "', 'Infinity']) {
      const e = err(`stop_id,boardings,alightings\nv1-0,${v},1\n`);
      expect(e.context, v).toMatchObject({ file: 'r.csv', line: 2, column: 'boardings' });
    }
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
    const r = parseRidership('stop_id,route_id,boardings,alightings\nnowhere,V1,3,1\nv1-1,V9,3,1\nv1-2,V1,3,1\n', feed, {
      file: 'r.csv',
      warnings: w,
    });
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
    const text =
      'stop_id,boardings,alightings\n' +
      patterns.patterns[0].stopIdx.map((s, j) => `${feed.stops[s].id},${j < 11 ? 20 : 0},${j > 0 ? 20 : 0}`).join('\n') +
      '\nv2-n,10,0\nv2-s,0,10\n';
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
    const d = ridershipDemand(
      parseRidership('stop_id,route_id,boardings,alightings\nv1-0,V1,100,0\nv1-11,V1,0,50\n', feed, { file: 'r.csv', warnings: w }),
      layouts,
      { warnings: w },
    );
    const v1 = d.get('V1:0:1')!;
    expect(v1.alightPerDay[11]).toBeCloseTo(100, 9);
    expect(v1.meanTripLengthM).toBeCloseTo(1700, 9);
    expect(
      w
        .list()
        .map((x) => x.code)
        .sort(),
    ).toEqual(['ridership-stop-missing', 'ridership-unbalanced']);
  });
});

describe('loadRidership on a large file', () => {
  it(`reads a file in pieces and refuses one of more than ${MAX_RIDERSHIP_ROWS} data rows as too large`, () => {
    const dir = mkdtempSync(join(tmpdir(), 'stopspan-ridership-'));
    try {
      // rows of stops the feed lacks: skipped and counted, nothing about them remembered
      const row = 'elsewhere,V1,1,1\n';
      const path = join(dir, 'r.csv');
      const fd = openSync(path, 'w');
      writeSync(fd, 'stop_id,route_id,boardings,alightings\nv1-0,V1,3,1\n');
      const block = row.repeat(100_000);
      for (let k = 0; k < MAX_RIDERSHIP_ROWS / 100_000; k++) writeSync(fd, block);
      closeSync(fd);
      const w = new WarningSink();
      expect(() => loadRidership(path, feed, { warnings: w })).toThrow(/more than 1000000 data rows/);
      // one row fewer reads, the unknown stops counted
      truncateSync(path, statSync(path).size - row.length);
      const w2 = new WarningSink();
      const r = loadRidership(path, feed, { warnings: w2 });
      expect(r.rows).toHaveLength(1);
      expect(w2.list().find((x) => x.code === 'ridership-unknown-stop')?.count).toBe(MAX_RIDERSHIP_ROWS - 1);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
