// compare with other feeds as context (--context): the stops that lost or gained their link to another mode
// (served within 150 m of a context station in one version only), and why: not served in the other
// version, or moved away. Hand-made Vellmoor streets and a hand-made rail feed on disk; then the built
// command on the check fixtures, where one stop moves 300 m.
import { mkdtempSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { compareFeeds } from '../../src/compare/compare.js';
import { contextStops } from '../../src/network/contextStations.js';
import { comparisonText } from '../../src/report/compareRender.js';
import { buildFeed, street } from '../helpers/buildFeed.js';
import { ROOT, runCli } from '../helpers/cli.js';
import Ajv2020 from 'ajv/dist/2020.js';

const work = mkdtempSync(join(tmpdir(), 'stopspan-compare-context-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

// [D] 60 m of latitude: 60 / 111 320 degrees (2 pi x 6 378 km / 360 metres per degree)
const DEG_60M = 60 / 111_320;

function railFolder(name: string, stations: { id: string; name: string; lat: number; lon: number }[]): string {
  const dir = join(work, name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(
    join(dir, 'stops.txt'),
    'stop_id,stop_name,stop_lat,stop_lon,location_type\n' + stations.map((s) => `${s.id},${s.name},${s.lat},${s.lon},1\n`).join(''),
  );
  writeFileSync(
    join(dir, 'calendar.txt'),
    'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWK,1,1,1,1,1,0,0,20260101,20271231\n',
  );
  return dir;
}

describe('compare: links to other modes', () => {
  it('lists a stop no longer served beside a station as lost, and a newly served one as gained', async () => {
    const stops = street(11, 250);
    const times = (ids: string[]) => ids.map((s, k) => [s, 28800 + 60 * k, 28800 + 60 * k] as [string, number, number]);
    const ids = stops.map((s) => s.id);
    const old = buildFeed({ stops, trips: [{ id: 't1', routeId: 'R1', times: times(ids.slice(0, 10)) }] });
    // the new version skips S5 and runs on to S11
    const neu = buildFeed({ stops, trips: [{ id: 't1', routeId: 'R1', times: times([...ids.slice(0, 4), ...ids.slice(5)]) }] });
    const rail = railFolder('vellmoor-rail', [
      { id: 'A', name: 'Vellmoor Oost', lat: stops[4].lat + DEG_60M, lon: stops[4].lon },
      { id: 'B', name: 'Vellmoor Haven', lat: stops[10].lat + DEG_60M, lon: stops[10].lon },
      { id: 'C', name: 'Vellmoor Centraal', lat: stops[0].lat + DEG_60M, lon: stops[0].lon },
    ]);
    const a = await contextStops(old.feed, old.patterns, [rail]);
    const b = await contextStops(neu.feed, neu.patterns, [rail]);
    const c = compareFeeds(old.feed, neu.feed, old.patterns, neu.patterns, { stationStops: { old: a.near, new: b.near } });
    expect(c.stationLinks).toEqual({
      lost: [{ stopId: 'S5', name: 'Vellmoor S5', station: 'station Vellmoor Oost (vellmoor-rail), 60 m', reason: 'not-served' }],
      gained: [{ stopId: 'S11', name: 'Vellmoor S11', station: 'station Vellmoor Haven (vellmoor-rail), 60 m', reason: 'not-served' }],
    });
    // S1 keeps its link to Vellmoor Centraal: not listed
    const text = comparisonText(c);
    expect(text).toContain('links to other modes (stops beside a context station): 1 lost, 1 gained');
    expect(text).toContain('- S5  Vellmoor S5  was beside station Vellmoor Oost (vellmoor-rail), 60 m; not served in the new version');
    // without context feeds the comparison says nothing about them
    expect(compareFeeds(old.feed, neu.feed, old.patterns, neu.patterns).stationLinks).toBeNull();
  });
});

describe('stopspan compare --context', () => {
  const FIX = join(ROOT, 'fixtures/check');
  it('lists the stop that moved away from a station, in the text, the JSON and the page', async () => {
    // 60 m south of S3 in the clean version; the stop-off-path version has S3 300 m north
    const rail = railFolder('vellmoor-metro', [{ id: 'H', name: 'Havenplein', lat: 52.37 - DEG_60M, lon: 4.9117835 }]);
    const out = join(work, 'page');
    const r = await runCli([
      'compare',
      join(FIX, 'clean'),
      join(FIX, 'stop-off-path'),
      '--context',
      rail,
      '--json',
      '--out',
      out,
      '--quiet',
    ]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    // the document still meets its published schema (JSON Schema 2020-12 [C], checked by ajv)
    const validate = new Ajv2020.default({ allErrors: true, strict: true, allowUnionTypes: true, validateFormats: false }).compile(
      JSON.parse(readFileSync(join(ROOT, 'schema/compare.schema.json'), 'utf8')),
    );
    validate(doc);
    expect(validate.errors ?? []).toEqual([]);
    expect(doc.station_links).toEqual({
      lost: [{ stop_id: 'S3', name: 'Vellmoor Havenstraat', station: 'station Havenplein (vellmoor-metro), 60 m', reason: 'moved' }],
      gained: [],
    });
    expect(readFileSync(join(out, 'compare.html'), 'utf8')).toContain('<h2>Links to other modes lost (1) and gained (0)</h2>');
    const plain = JSON.parse((await runCli(['compare', join(FIX, 'clean'), join(FIX, 'stop-off-path'), '--json'])).stdout);
    expect(plain.station_links).toBeNull();
  });

  it('refuses an unreadable context feed with one line naming it', async () => {
    const r = await runCli(['compare', join(FIX, 'clean'), join(FIX, 'clean'), '--context', join(work, 'no-such-metro')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^error: .*context feed .*no-such-metro.*\n$/);
  });
});
