// Checks the benchmark's scaling-series generator (scripts/make-scaled.mjs) and its floor (a) counter
// (scripts/bench-run.mjs): that an enlarged feed holds exactly k times the stop_times rows, with new trip
// ids and shifted times, and the same stops and shapes. No timing is asserted here.

import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { writeZip } from './helpers/zip.js';
import { parse } from 'csv-parse/sync';
import { readZip, shiftTime } from '../scripts/make-scaled.mjs';

const repoDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const makeScaled = path.join(repoDir, 'scripts/make-scaled.mjs');
const benchRun = path.join(repoDir, 'scripts/bench-run.mjs');
const demoFeed = path.join(repoDir, 'fixtures/demo/demo-feed.zip');
const feedsDir = path.resolve(process.env.STOPSPAN_FEEDS ?? path.join(repoDir, '../shared/feeds'));

type Entry = { name: string; data: Buffer };

/** Parses a table with csv-parse (the reference CSV parser), header row first. */
function table(entries: Entry[], name: string): string[][] {
  const e = entries.find((x) => x.name === name);
  if (!e) throw new Error(`no ${name}`);
  return parse(e.data, { bom: true, skip_empty_lines: true, relax_column_count: true }) as string[][];
}

function runScaled(input: string, outDir: string, scales: string): { scale: number; file: string; stopTimesRows: number }[] {
  const out = execFileSync(process.execPath, [makeScaled, '--in', input, '--out', outDir, '--scales', scales], { encoding: 'utf8' });
  return out
    .trim()
    .split('\n')
    .map((l) => JSON.parse(l));
}

let tmp: string;
beforeAll(() => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'stopspan-bench-test-'));
});
afterAll(() => {
  fs.rmSync(tmp, { recursive: true, force: true });
});

describe('shiftTime', () => {
  it('shifts H:MM:SS and lets hours pass 24, as GTFS allows', () => {
    // GTFS Schedule reference [C]: stop_times times may exceed 24:00:00 for trips after midnight.
    expect(shiftTime('23:59:30', 60)).toBe('24:00:30');
    expect(shiftTime('7:05:00', 3600)).toBe('08:05:00');
    expect(shiftTime('', 60)).toBe('');
    expect(shiftTime('12:00:00', 0)).toBe('12:00:00');
    expect(() => shiftTime('12:61:00', 60)).toThrow(/not a GTFS time/);
  });
});

describe('make-scaled on a hand-built Vellmoor feed', () => {
  const stopTimes =
    'trip_id,arrival_time,departure_time,stop_id,stop_sequence,stop_headsign\n' +
    'T1,08:00:00,08:00:00,S1,1,"Harbour, north"\n' +
    'T1,,,S2,2,\n' +
    'T1,08:06:00,08:06:30,S3,3,\n' +
    'T2,23:58:00,23:58:00,S3,1,\n' +
    'T2,24:03:00,24:03:00,S1,2,\n';
  const feedFiles = {
    'agency.txt': 'agency_id,agency_name,agency_url,agency_timezone\nVT,Vellmoor Transit,https://vellmoor.example,Europe/Berlin\n',
    'routes.txt': 'route_id,agency_id,route_short_name,route_type\nR1,VT,1,3\n',
    'trips.txt': 'route_id,service_id,trip_id,direction_id,shape_id,block_id\nR1,WK,T1,0,SH1,B1\nR1,WK,T2,1,SH1,\n',
    'stops.txt': 'stop_id,stop_name,stop_lat,stop_lon\nS1,Harbour,52.0,9.0\nS2,Market,52.001,9.0\nS3,Mill,52.002,9.0\n',
    'shapes.txt': 'shape_id,shape_pt_lat,shape_pt_lon,shape_pt_sequence\nSH1,52.0,9.0,1\nSH1,52.002,9.0,2\n',
    'calendar.txt':
      'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWK,1,1,1,1,1,0,0,20260101,20261231\n',
    'frequencies.txt': 'trip_id,start_time,end_time,headway_secs,exact_times\nT2,23:00:00,23:59:00,600,1\n',
    'stop_times.txt': stopTimes,
  };
  let input: string;
  beforeAll(async () => {
    input = path.join(tmp, 'vellmoor.zip');
    await writeZip(input, feedFiles);
  });

  it('writes exactly k times the stop_times rows, with unique trip ids and times shifted per copy', async () => {
    const [r1, r3] = runScaled(input, path.join(tmp, 'hand'), '1,3');
    expect(r1.stopTimesRows).toBe(5);
    expect(r3.stopTimesRows).toBe(15);
    const e3: Entry[] = await readZip(r3.file);
    const [stHeader, ...st] = table(e3, 'stop_times.txt');
    expect(stHeader).toEqual(['trip_id', 'arrival_time', 'departure_time', 'stop_id', 'stop_sequence', 'stop_headsign']);
    expect(st.length).toBe(15);
    const [, ...trips] = table(e3, 'trips.txt');
    expect(trips.map((t) => t[2])).toEqual(['T1', 'T2', 'T1~x1', 'T2~x1', 'T1~x2', 'T2~x2']);
    expect(new Set(trips.map((t) => t[2])).size).toBe(6);
    expect(trips.map((t) => t[5])).toEqual(['B1', '', 'B1~x1', '', 'B1~x2', '']);
    // the third copy of T1: times 2 x 60 s later, the blank time stays blank, the quoted comma survives
    const t1x2 = st.filter((r) => r[0] === 'T1~x2');
    expect(t1x2.map((r) => [r[1], r[2], r[3]])).toEqual([
      ['08:02:00', '08:02:00', 'S1'],
      ['', '', 'S2'],
      ['08:08:00', '08:08:30', 'S3'],
    ]);
    expect(t1x2[0][5]).toBe('Harbour, north');
    expect(st.filter((r) => r[0] === 'T2~x1').map((r) => r[1])).toEqual(['23:59:00', '24:04:00']);
    const [, ...freq] = table(e3, 'frequencies.txt');
    expect(freq.map((f) => [f[0], f[1], f[2]])).toEqual([
      ['T2', '23:00:00', '23:59:00'],
      ['T2~x1', '23:01:00', '24:00:00'],
      ['T2~x2', '23:02:00', '24:01:00'],
    ]);
    // stops, shapes, routes and calendar are the input's bytes
    const e0: Entry[] = await readZip(input);
    for (const name of ['stops.txt', 'shapes.txt', 'routes.txt', 'calendar.txt', 'agency.txt']) {
      expect(e3.find((e) => e.name === name)?.data.equals(e0.find((e) => e.name === name)!.data)).toBe(true);
    }
  });

  it('is deterministic: the same input gives the same bytes', () => {
    const [a] = runScaled(input, path.join(tmp, 'det-a'), '4');
    const [b] = runScaled(input, path.join(tmp, 'det-b'), '4');
    expect(fs.readFileSync(a.file).equals(fs.readFileSync(b.file))).toBe(true);
  });

  it('floor (a) counts the same rows as csv-parse does', () => {
    const [r] = runScaled(input, path.join(tmp, 'floor'), '7');
    const out = JSON.parse(execFileSync(process.execPath, [benchRun, 'inflate', r.file], { encoding: 'utf8' }));
    expect(out.error).toBeNull();
    expect(out.rows).toBe(35);
    expect(out.maxRssMB).toBeGreaterThan(0);
  });
});

describe.skipIf(!fs.existsSync(demoFeed))('make-scaled on the demo feed', () => {
  it('at 1x keeps the demo rows and at k x holds exactly k times them', async () => {
    const demoRows = table(await readZip(demoFeed), 'stop_times.txt').length - 1;
    expect(demoRows).toBeGreaterThan(0);
    const [r1, r2] = runScaled(demoFeed, path.join(tmp, 'demo'), '1,2');
    expect(table(await readZip(r1.file), 'stop_times.txt').length - 1).toBe(demoRows);
    expect(table(await readZip(r2.file), 'stop_times.txt').length - 1).toBe(2 * demoRows);
    expect(r2.stopTimesRows).toBe(2 * demoRows);
  });
});

const lirr = path.join(feedsDir, 'lirr-rail.zip');
describe.skipIf(!fs.existsSync(lirr))('on a real feed', () => {
  it('floor (a) counts the stop_times rows the feeds README documents, and make-scaled doubles them', () => {
    // ../shared/feeds/README.md [C, measured independently]: lirr-rail.zip has 22 730 stop_times rows.
    const a = JSON.parse(execFileSync(process.execPath, [benchRun, 'inflate', lirr], { encoding: 'utf8' }));
    expect(a.rows).toBe(22730);
    const [r2] = runScaled(lirr, path.join(tmp, 'lirr'), '2');
    const b = JSON.parse(execFileSync(process.execPath, [benchRun, 'inflate', r2.file], { encoding: 'utf8' }));
    expect(b.rows).toBe(2 * 22730);
  });

  it("inflating the reader's way counts the same rows as floor (a), on the real zip and on a scaled copy", () => {
    const c = JSON.parse(execFileSync(process.execPath, [benchRun, 'inflate-reader', lirr], { encoding: 'utf8' }));
    expect(c.error).toBeNull();
    expect(c.rows).toBe(22730); // the same documented count as above
    const [r2] = runScaled(lirr, path.join(tmp, 'lirr-reader'), '2');
    const d = JSON.parse(execFileSync(process.execPath, [benchRun, 'inflate-reader', r2.file], { encoding: 'utf8' }));
    expect(d.rows).toBe(2 * 22730);
  });
});
