// The GeoPackage (`audit --format gpkg`, layers.gpkg): the demo feed of Vellmoor audited into a folder with
// the GeoJSON layers beside it, then read back by a GeoPackage reader from the registry
// (@ngageoint/geopackage: its own GeoPackageBinary and WKB decoding) and by the sqlite3 command for the
// standard's header fields and tables; each layer must hold the GeoJSON file's features, properties and
// coordinates, and where GDAL is installed its ogr2ogr must convert each layer back to that GeoJSON.
// Also: a failure leaves no folder, and without the optional SQLite binding the command stops in one line
// before reading the feed. Requirements cited are those of the OGC GeoPackage Encoding Standard 1.3
// (OGC 12-128).

import { execFileSync, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GPKG_APPLICATION_ID, GPKG_FILE, GPKG_USER_VERSION, geoPackageGeometry, writeGeoPackage } from '../../src/report/gpkg.js';
import type { StopspanError } from '../../src/common/errors.js';
import { writeReport } from '../../src/report/writeReport.js';
import { REPORT_MARKER } from '../../src/report/writeFolder.js';
import { makeSampleResult } from './sampleResult.js';
import { ROOT, runCli } from '../helpers/cli.js'; // builds dist/ when it is older than the sources

const FEED = join(ROOT, 'fixtures/demo/demo-feed.zip');
const RIDERSHIP = join(ROOT, 'fixtures/demo/ridership.csv');
const haveDemo = existsSync(FEED) && existsSync(RIDERSHIP);
/** better-sqlite3 is an optional dependency: without it the GeoPackage cannot be written, and these tests skip. */
const haveSqlite = (() => {
  try {
    createRequire(import.meta.url)('better-sqlite3');
    return true;
  } catch {
    return false;
  }
})();
const SQLITE_CLI = '/usr/bin/sqlite3';
const OGR2OGR = '/usr/bin/ogr2ogr';
if (!haveSqlite) console.warn('GeoPackage tests skipped: the optional package better-sqlite3 is not installed');
if (!haveDemo) console.warn('GeoPackage demo test skipped: fixtures/demo is absent');

type Props = Record<string, unknown>;
interface GeoFeature {
  geometry: { type: string; coordinates: unknown };
  properties: Props;
}

const LAYERS = ['patterns', 'stops', 'stop_points', 'candidates'];

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-gpkg-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe.skipIf(!haveSqlite || !haveDemo)('layers.gpkg of the demo feed', () => {
  let out: string;
  let gpkg: string;
  const geojson = new Map<string, GeoFeature[]>();
  beforeAll(async () => {
    out = join(dir, 'demo');
    const r = await runCli(['audit', FEED, '--ridership', RIDERSHIP, '--format', 'geojson,gpkg', '--out', out, '-q']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    gpkg = join(out, GPKG_FILE);
    for (const layer of LAYERS)
      geojson.set(layer, (JSON.parse(readFileSync(join(out, `${layer}.geojson`), 'utf8')) as { features: GeoFeature[] }).features);
  }, 120_000);

  it('is written with the GeoJSON files, and only when asked for', () => {
    expect(readdirSync(out).sort()).toEqual([
      REPORT_MARKER,
      'candidates.geojson',
      GPKG_FILE,
      'patterns.geojson',
      'stop_points.geojson',
      'stops.geojson',
    ]);
    for (const layer of LAYERS) expect(geojson.get(layer)!.length, layer).toBeGreaterThan(0);
  });

  it('holds every GeoJSON feature, with the same properties and coordinates, read back by a GeoPackage reader', async () => {
    const { GeoPackageAPI, GeometryData } = await import('@ngageoint/geopackage');
    const gp = await GeoPackageAPI.open(gpkg);
    try {
      expect(gp.getFeatureTables()).toEqual(LAYERS);
      for (const layer of LAYERS) {
        const want = geojson.get(layer)!;
        const got: GeoFeature[] = [];
        for (const f of gp.iterateGeoJSONFeatures(layer)) got.push(f as unknown as GeoFeature);
        expect(got.length, layer).toBe(want.length);
        got.forEach((f, i) => {
          const { fid, ...props } = f.properties;
          expect(fid, layer).toBe(i + 1);
          // BOOLEAN columns come back as the 0 or 1 they are stored as (Requirement 5, Table 1)
          const expected = Object.fromEntries(
            Object.entries(want[i].properties).map(([k, v]) => [k, typeof v === 'boolean' ? Number(v) : v]),
          );
          expect(props, `${layer} feature ${i + 1}`).toEqual(expected);
          expect(f.geometry, `${layer} feature ${i + 1}`).toEqual(want[i].geometry);
        });
        // the layer's extent in gpkg_contents (Requirement 13) is the features' own
        const contents = gp.getInfoForTable(gp.getFeatureDao(layer)).contents as { minX: number; maxX: number; minY: number; maxY: number };
        const xs = want.flatMap((f) => positions(f).map((p) => p[0]));
        const ys = want.flatMap((f) => positions(f).map((p) => p[1]));
        expect([contents.minX, contents.maxX, contents.minY, contents.maxY], layer).toEqual([
          Math.min(...xs),
          Math.max(...xs),
          Math.min(...ys),
          Math.max(...ys),
        ]);
      }
      // a geometry's header (clause 2.1.3.1.1) as the reader decodes it: little-endian, WGS 84, an envelope
      const row = gp.connection.get('SELECT geom FROM patterns WHERE fid = 1') as { geom: Buffer };
      const g = new GeometryData(row.geom);
      expect([g.byteOrder, g.srsId, g.empty, g.extended, g.geometryError]).toEqual([
        GeometryData.LITTLE_ENDIAN,
        4326,
        false,
        false,
        undefined,
      ]);
      const first = positions(geojson.get('patterns')![0]);
      expect([g.envelope.minX, g.envelope.maxX, g.envelope.minY, g.envelope.maxY]).toEqual([
        Math.min(...first.map((p) => p[0])),
        Math.max(...first.map((p) => p[0])),
        Math.min(...first.map((p) => p[1])),
        Math.max(...first.map((p) => p[1])),
      ]);
    } finally {
      gp.close();
    }
  });

  it.skipIf(!existsSync(OGR2OGR))(
    'converts back with GDAL (where installed), layer by layer, to the GeoJSON beside it, without a warning',
    () => {
      for (const layer of LAYERS) {
        // GDAL's own GeoPackage driver reads the file and writes the layer as RFC 7946 GeoJSON
        const p = spawnSync(OGR2OGR, ['-f', 'GeoJSON', '-lco', 'RFC7946=YES', '/vsistdout/', gpkg, layer], {
          encoding: 'utf8',
          maxBuffer: 64 << 20,
        });
        expect(p.stderr, layer).toBe('');
        expect(p.status, layer).toBe(0);
        const got = (JSON.parse(p.stdout) as { features: GeoFeature[] }).features;
        const want = geojson.get(layer)!;
        expect(got.length, layer).toBe(want.length);
        got.forEach((f, i) => {
          expect(f.properties, `${layer} feature ${i + 1}`).toEqual(want[i].properties);
          expect(f.geometry, `${layer} feature ${i + 1}`).toEqual(want[i].geometry);
        });
      }
    },
  );

  it.skipIf(!existsSync(SQLITE_CLI))('has the header fields and gpkg tables the standard requires (sqlite3 command)', () => {
    const sql = (q: string): string => execFileSync(SQLITE_CLI, ['-readonly', gpkg, q], { encoding: 'utf8' }).trim();
    // Requirement 2 [C]: application_id 0x47504B47 ("GPKG"), user_version 10300 for version 1.3.0
    expect(sql('PRAGMA application_id')).toBe(String(0x47504b47));
    expect(GPKG_APPLICATION_ID).toBe(0x47504b47);
    expect(sql('PRAGMA user_version')).toBe('10300');
    expect(GPKG_USER_VERSION).toBe(10300);
    // Requirement 1 [C]: an SQLite 3 file, its first 16 bytes "SQLite format 3\0"
    expect(readFileSync(gpkg).subarray(0, 16).toString('latin1')).toBe('SQLite format 3\0');
    // Requirements 6 and 7 [C]: integrity_check "ok", foreign_key_check empty
    expect(sql('PRAGMA integrity_check')).toBe('ok');
    expect(sql('PRAGMA foreign_key_check')).toBe('');
    // Requirement 11 [C]: the rows for WGS 84 (EPSG 4326) and the undefined Cartesian (-1) and geographic (0) systems
    expect(
      sql(
        "SELECT srs_id || ',' || organization || ',' || organization_coordsys_id || ',' || (srs_id <= 0 AND definition = 'undefined') FROM gpkg_spatial_ref_sys ORDER BY srs_id",
      ),
    ).toBe('-1,NONE,-1,1\n0,NONE,0,1\n4326,EPSG,4326,0');
    // Requirement 13 and clause 2.1.5 [C]: one gpkg_contents row of data_type 'features' and one geometry column per layer
    expect(sql("SELECT table_name || ',' || data_type || ',' || srs_id FROM gpkg_contents ORDER BY rowid")).toBe(
      LAYERS.map((l) => `${l},features,4326`).join('\n'),
    );
    expect(
      sql(
        "SELECT table_name || ',' || column_name || ',' || geometry_type_name || ',' || srs_id || ',' || z || ',' || m FROM gpkg_geometry_columns ORDER BY rowid",
      ),
    ).toBe(
      [
        'patterns,geom,LINESTRING,4326,0,0',
        'stops,geom,POINT,4326,0,0',
        'stop_points,geom,POINT,4326,0,0',
        'candidates,geom,POINT,4326,0,0',
      ].join('\n'),
    );
    // Requirement 15 [C]: last_change is a DATETIME, YYYY-MM-DDTHH:MM:SS.SSSZ
    for (const t of sql('SELECT last_change FROM gpkg_contents').split('\n')) expect(t).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
    for (const layer of LAYERS) {
      expect(sql(`SELECT count(*) FROM ${layer}`), layer).toBe(String(geojson.get(layer)!.length));
      // the columns: the key, the geometry, then the GeoJSON properties in order, typed as their values are
      const columns = sql(`SELECT name || ' ' || type FROM pragma_table_info('${layer}') ORDER BY cid`).split('\n');
      const props = Object.keys(geojson.get(layer)![0].properties);
      expect(
        columns.map((c) => c.split(' ')[0]),
        layer,
      ).toEqual(['fid', 'geom', ...props]);
      expect(columns[1], layer).toBe(`geom ${layer === 'patterns' ? 'LINESTRING' : 'POINT'}`);
      for (const [k, i] of props.map((p, i) => [p, i + 2] as const)) {
        const type = columns[i].split(' ')[1];
        for (const f of geojson.get(layer)!) {
          const v = f.properties[k];
          if (v === null) continue;
          if (typeof v === 'string') expect(type, `${layer}.${k}`).toBe('TEXT');
          else if (typeof v === 'boolean') expect(type, `${layer}.${k}`).toBe('BOOLEAN');
          else if (!Number.isInteger(v)) expect(type, `${layer}.${k}`).toBe('REAL');
          else expect(['INTEGER', 'REAL'], `${layer}.${k}`).toContain(type);
        }
      }
    }
    // a measure is REAL in every run, even where this feed's values happen to be whole (the CSV column says so)
    expect(sql("SELECT type FROM pragma_table_info('stop_points') WHERE name = 'trips_per_day'")).toBe('REAL');
    expect(sql("SELECT type FROM pragma_table_info('patterns') WHERE name = 'stop_count'")).toBe('INTEGER');
  });
});

describe('the GeoPackage geometry encoding', () => {
  it('is read back by the registry reader: header, envelope and ISO WKB of a line and a point', async () => {
    const { GeometryData } = await import('@ngageoint/geopackage');
    const line = {
      type: 'LineString' as const,
      coordinates: [
        [-0.5, 51.25],
        [2.125, -33.5],
        [1, 0],
      ] as [number, number][],
    };
    const g = new GeometryData(geoPackageGeometry(line));
    expect([g.byteOrder, g.srsId, g.empty, g.extended, g.geometryError]).toEqual([
      GeometryData.LITTLE_ENDIAN,
      4326,
      false,
      false,
      undefined,
    ]);
    expect([g.envelope.minX, g.envelope.maxX, g.envelope.minY, g.envelope.maxY]).toEqual([-0.5, 2.125, -33.5, 51.25]);
    expect(g.geometry.toGeoJSON()).toEqual(line);
    const pt = { type: 'Point' as const, coordinates: [10.063461, 45.014682] as [number, number] };
    const p = new GeometryData(geoPackageGeometry(pt));
    expect(p.geometry.toGeoJSON()).toEqual(pt);
    expect([p.envelope.minX, p.envelope.maxX, p.envelope.minY, p.envelope.maxY]).toEqual([10.063461, 10.063461, 45.014682, 45.014682]);
    // clause 2.1.3.1.1 [C]: magic "GP", version 0, flags 0b00000011 (envelope [minx, maxx, miny, maxy], little-endian)
    expect([...geoPackageGeometry(pt).subarray(0, 4)]).toEqual([0x47, 0x50, 0, 3]);
  });
});

describe.skipIf(!haveSqlite)('writing the GeoPackage with the report', () => {
  it('writes layers.gpkg and the marker alone with formats [gpkg], and nothing by default', async () => {
    const result = makeSampleResult();
    const only = join(dir, 'only');
    await writeReport(result, only, { formats: ['gpkg'] });
    expect(readdirSync(only).sort()).toEqual([REPORT_MARKER, GPKG_FILE]);
    const all = join(dir, 'default');
    await writeReport(result, all);
    expect(readdirSync(all)).not.toContain(GPKG_FILE);
  });

  it('says bad-output in one line when the place refuses the file', async () => {
    const e = (() => {
      try {
        writeGeoPackage(makeSampleResult(), join(dir, 'no-such-folder', GPKG_FILE));
      } catch (err) {
        return err as StopspanError;
      }
      throw new Error('no error');
    })();
    expect(e.code).toBe('bad-output');
    expect(e.message).toMatch(/^cannot write layers\.gpkg: /);
  });

  it('leaves no folder and no temporary file when a layer cannot be written', async () => {
    const result = makeSampleResult();
    expect(result.candidates.length).toBeGreaterThan(0);
    // the last candidate's routes can be read once (the pass that finds the columns) but not twice: the
    // insert fails half way, inside the GeoPackage's transaction, with its file open in the temporary folder
    let reads = 0;
    Object.defineProperty(result.candidates[result.candidates.length - 1], 'routeIds', {
      get: () => {
        if (++reads > 1) throw new Error('routes unreadable');
        return ['R1'];
      },
    });
    const parent = mkdtempSync(join(dir, 'broken-'));
    const target = join(parent, 'report');
    await expect(writeReport(result, target, { formats: ['gpkg'] })).rejects.toThrow('routes unreadable');
    expect(reads).toBe(2);
    expect(readdirSync(parent)).toEqual([]);
  });
});

describe('without the optional SQLite binding', () => {
  it('stops in one line with exit 2 before the feed is read, and writes nothing', () => {
    // a copy of the built command where better-sqlite3 cannot be resolved (no node_modules above it)
    const copy = join(dir, 'no-sqlite');
    cpSync(join(ROOT, 'dist'), join(copy, 'dist'), { recursive: true });
    writeFileSync(join(copy, 'package.json'), '{"type":"module"}');
    const bin = join(copy, 'dist/bin/stopspan.js');
    const out = join(copy, 'out');
    // the feed does not exist: an error about it would mean the feed was read first
    const r = spawnSync(process.execPath, [bin, 'audit', join(copy, 'no-such-feed.zip'), '--format', 'csv,gpkg', '--out', out], {
      cwd: copy,
      encoding: 'utf8',
      env: { ...process.env, NO_COLOR: '1' },
    });
    expect(r.stderr).toBe(
      'error: --format gpkg (the GeoPackage) needs the optional package better-sqlite3 (version 12), which is not installed here: run npm install better-sqlite3@12\n',
    );
    expect(r.status).toBe(2);
    expect(existsSync(out)).toBe(false);
    // and without gpkg the same copy gets as far as the feed
    const csv = spawnSync(process.execPath, [bin, 'audit', join(copy, 'no-such-feed.zip'), '--format', 'csv', '--out', out], {
      cwd: copy,
      encoding: 'utf8',
      env: { ...process.env, NO_COLOR: '1' },
    });
    expect(csv.status).toBe(2);
    expect(csv.stderr).toMatch(/no-such-feed\.zip/);
  });
});

function positions(f: GeoFeature): [number, number][] {
  return f.geometry.type === 'Point' ? [f.geometry.coordinates as [number, number]] : (f.geometry.coordinates as [number, number][]);
}
