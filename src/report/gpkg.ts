// The audit's map layers as one GeoPackage file (layers.gpkg, `--format gpkg`): the features of
// patterns.geojson, stops.geojson, stop_points.geojson and candidates.geojson (geojson.ts builds them, so
// the two outputs carry one set of columns), each as a feature table, in a file any GIS opens whole.
// Written to the OGC GeoPackage Encoding Standard 1.3 (OGC 12-128); the clauses and requirements named
// beside each part are that standard's. No R-tree spatial index (an optional extension, Annex F.3): its
// triggers call functions only a GIS provides, and the layers are small enough (thousands of features)
// for a GIS to read whole or index itself. The SQLite binding is the run history's optional one, loaded
// on first use; the file is written inside writeFolder's temporary folder, so a failure leaves nothing.

import type { AuditResult } from '../audit/types.js';
import { StopspanError } from '../common/errors.js';
import { loadSqlite, type SqliteBinding } from '../history/loadSqlite.js';
import { candidateColumns, PATTERN_COLUMNS, STOP_COLUMNS } from './csv.js';
import {
  candidateFeatures,
  patternFeatures,
  stopFeatures,
  stopPointFeatures,
  type Feature,
  type LineString,
  type Point,
} from './geojson.js';
import type { FileWriter } from './writeFolder.js';

/** The file's name in the output folder. */
export const GPKG_FILE = 'layers.gpkg';

/** Requirement 2 (clause 1.1.1.1.1, File Format): "GPKG" in the header's application_id field. */
export const GPKG_APPLICATION_ID = 0x47504b47;
/** Requirement 2: user_version is the standard's version, major, two-digit minor, two-digit fix: 1.3.0. */
export const GPKG_USER_VERSION = 10300;

/** The one coordinate system of the layers: WGS 84 longitude/latitude, as in the GeoJSON (RFC 7946). */
const SRS_ID = 4326;

/** The SQLite binding, or a one-line 'bad-option' error saying how to install it (checked before any work). */
export function loadGeoPackageSqlite(): SqliteBinding {
  return loadSqlite(undefined, { what: '--format gpkg (the GeoPackage)', code: 'bad-option' });
}

type Geometry = LineString | Point;

interface Layer {
  table: string;
  geometryType: 'LINESTRING' | 'POINT'; // clause 2.1.4 geometry type names, as gpkg_geometry_columns holds them
  description: string;
  features: (result: AuditResult) => Iterable<Feature<Geometry>>;
}

/** The layers, named as their GeoJSON files are. */
const LAYERS: Layer[] = [
  {
    table: 'patterns',
    geometryType: 'LINESTRING',
    description: 'route patterns as lines along their path, with the columns of patterns.csv',
    features: patternFeatures,
  },
  {
    table: 'stops',
    geometryType: 'POINT',
    description: 'one point per stop of each pattern, with the columns of stops.csv',
    features: stopFeatures,
  },
  {
    table: 'stop_points',
    geometryType: 'POINT',
    description: 'one point per stop served, with the routes and patterns serving it',
    features: stopPointFeatures,
  },
  {
    table: 'candidates',
    geometryType: 'POINT',
    description: 'the candidates of candidates.csv: a removal at its stop, an addition at the site proposed',
    features: candidateFeatures,
  },
];

/** Declared column types (Requirement 5, Table 1 GeoPackage Data Types). */
type ColumnType = 'INTEGER' | 'REAL' | 'TEXT' | 'BOOLEAN';

/**
 * The type of every column the CSV files also have, from their column tables (a number with decimals is
 * REAL, one without is INTEGER, text TEXT), so a column's type is the same in every run whatever its values;
 * a name means one thing in every file. Other properties take the type of their values (see columnTypes).
 */
function contractTypes(): Map<string, ColumnType> {
  const types = new Map<string, ColumnType>();
  for (const col of [...PATTERN_COLUMNS, ...STOP_COLUMNS, ...candidateColumns('')]) {
    types.set(col.name, col.kind === 'text' ? 'TEXT' : col.digits === undefined ? 'INTEGER' : 'REAL');
  }
  return types;
}

/** What one pass over a layer's features finds: its columns in order with their types, count and extent. */
interface LayerShape {
  columns: [name: string, type: ColumnType][];
  count: number;
  bounds: [minX: number, minY: number, maxX: number, maxY: number] | null;
}

function layerShape(features: Iterable<Feature<Geometry>>, contract: Map<string, ColumnType>): LayerShape {
  // per column not in the contract: the kinds of value seen
  const seen = new Map<string, { text: boolean; real: boolean; integer: boolean; boolean: boolean }>();
  let count = 0;
  let bounds: LayerShape['bounds'] = null;
  for (const f of features) {
    count++;
    for (const [name, v] of Object.entries(f.properties)) {
      let s = seen.get(name);
      if (!s) seen.set(name, (s = { text: false, real: false, integer: false, boolean: false }));
      if (typeof v === 'string') s.text = true;
      else if (typeof v === 'boolean') s.boolean = true;
      else if (typeof v === 'number') {
        if (Number.isInteger(v)) s.integer = true;
        else s.real = true;
      }
    }
    const e = envelope(f.geometry);
    bounds = bounds
      ? [Math.min(bounds[0], e[0]), Math.min(bounds[1], e[2]), Math.max(bounds[2], e[1]), Math.max(bounds[3], e[3])]
      : [e[0], e[2], e[1], e[3]];
  }
  const columns: LayerShape['columns'] = [...seen].map(([name, s]) => {
    const known = contract.get(name);
    if (known) return [name, known];
    // values of one kind give that kind; numbers with any fraction are REAL; a mix with text, or none at all, TEXT
    if (s.text || (s.boolean && (s.integer || s.real))) return [name, 'TEXT'];
    if (s.boolean) return [name, 'BOOLEAN'];
    if (s.real) return [name, 'REAL'];
    return [name, s.integer ? 'INTEGER' : 'TEXT'];
  });
  return { columns, count, bounds };
}

/** A geometry's envelope as clause 2.1.3.1.1 orders it: minx, maxx, miny, maxy. */
function envelope(g: Geometry): [number, number, number, number] {
  const points = g.type === 'Point' ? [g.coordinates] : g.coordinates;
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (const [x, y] of points) {
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  return [minX, maxX, minY, maxY];
}

/**
 * A geometry as GeoPackageBinary (clause 2.1.3.1.1, BLOB Format): the header (magic "GP", version 0, flags,
 * srs_id, envelope) and then the geometry as ISO WKB (ISO 13249-3 / OGC 06-103r4 clause 8), all little-endian.
 * Flags: bit 5 X = 0 (StandardGeoPackageBinary), bit 4 Y = 0 (not empty), bits 3-1 E = 1 (envelope
 * [minx, maxx, miny, maxy], 32 bytes), bit 0 B = 1 (little-endian).
 */
export function geoPackageGeometry(g: Geometry, srsId: number = SRS_ID): Buffer {
  const points = g.type === 'Point' ? [g.coordinates] : g.coordinates;
  const wkbLength = g.type === 'Point' ? 21 : 9 + 16 * points.length;
  const buf = Buffer.alloc(8 + 32 + wkbLength);
  buf.write('GP', 0, 'latin1');
  buf.writeUInt8(0, 2); // version 1 of the format is written 0
  buf.writeUInt8((1 << 1) | 1, 3);
  buf.writeInt32LE(srsId, 4);
  const [minX, maxX, minY, maxY] = envelope(g);
  buf.writeDoubleLE(minX, 8);
  buf.writeDoubleLE(maxX, 16);
  buf.writeDoubleLE(minY, 24);
  buf.writeDoubleLE(maxY, 32);
  let o = 40;
  buf.writeUInt8(1, o); // WKB byte order: 1 = little-endian (NDR)
  buf.writeUInt32LE(g.type === 'Point' ? 1 : 2, o + 1); // WKB geometry type: 1 Point, 2 LineString (2D)
  o += 5;
  if (g.type === 'LineString') {
    buf.writeUInt32LE(points.length, o);
    o += 4;
  }
  for (const [x, y] of points) {
    buf.writeDoubleLE(x, o);
    buf.writeDoubleLE(y, o + 8);
    o += 16;
  }
  return buf;
}

/** An SQL identifier, quoted (the column names are the GeoJSON properties'; some, like rank, are SQL words). */
const ident = (name: string): string => `"${name.replace(/"/g, '""')}"`;

/**
 * The gpkg_* tables every GeoPackage holds (Annex C, Table Definition SQL): gpkg_spatial_ref_sys
 * (clause 1.1.2, Requirement 10), gpkg_contents (clause 1.1.3, Requirement 13) and, for features,
 * gpkg_geometry_columns (clause 2.1.5).
 */
const SCHEMA = `
CREATE TABLE gpkg_spatial_ref_sys (
  srs_name TEXT NOT NULL,
  srs_id INTEGER PRIMARY KEY,
  organization TEXT NOT NULL,
  organization_coordsys_id INTEGER NOT NULL,
  definition  TEXT NOT NULL,
  description TEXT
);
CREATE TABLE gpkg_contents (
  table_name TEXT NOT NULL PRIMARY KEY,
  data_type TEXT NOT NULL,
  identifier TEXT UNIQUE,
  description TEXT DEFAULT '',
  last_change DATETIME NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
  min_x DOUBLE,
  min_y DOUBLE,
  max_x DOUBLE,
  max_y DOUBLE,
  srs_id INTEGER,
  CONSTRAINT fk_gc_r_srs_id FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys(srs_id)
);
CREATE TABLE gpkg_geometry_columns (
  table_name TEXT NOT NULL,
  column_name TEXT NOT NULL,
  geometry_type_name TEXT NOT NULL,
  srs_id INTEGER NOT NULL,
  z TINYINT NOT NULL,
  m TINYINT NOT NULL,
  CONSTRAINT pk_geom_cols PRIMARY KEY (table_name, column_name),
  CONSTRAINT uk_gc_table_name UNIQUE (table_name),
  CONSTRAINT fk_gc_tn FOREIGN KEY (table_name) REFERENCES gpkg_contents(table_name),
  CONSTRAINT fk_gc_srs FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys (srs_id)
);
`;

/** WGS 84 (EPSG:4326) as OGC WKT 1, the definition column's form (clause 1.1.2.1.2). */
const WGS84_WKT =
  'GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],' +
  'PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]],AUTHORITY["EPSG","4326"]]';

/** Requirement 11: the three rows every gpkg_spatial_ref_sys holds. */
const SRS_ROWS: [name: string, id: number, organization: string, orgId: number, definition: string, description: string][] = [
  ['WGS 84 geodetic', 4326, 'EPSG', 4326, WGS84_WKT, 'longitude/latitude coordinates in decimal degrees on the WGS 84 spheroid'],
  ['Undefined cartesian SRS', -1, 'NONE', -1, 'undefined', 'undefined cartesian coordinate reference system'],
  ['Undefined geographic SRS', 0, 'NONE', 0, 'undefined', 'undefined geographic coordinate reference system'],
];

/** Requirement 15: last_change as DATETIME, YYYY-MM-DDTHH:MM:SS.SSSZ; the run's own time, so one audit writes one file. */
function lastChange(generatedAt: string): string | null {
  const t = Date.parse(generatedAt);
  return Number.isFinite(t) ? new Date(t).toISOString() : null;
}

/** SQLite result codes that mean the place cannot hold the file, not a fault of this program. */
const DISK_FAULT = /^SQLITE_(FULL|IOERR|CANTOPEN|READONLY|PERM|NOLFS)/;

/**
 * Writes the layers of result as a new GeoPackage at path (a file that does not exist yet; writeFolder
 * hands a path in its temporary folder). One transaction, one prepared insert per layer, the features
 * taken one at a time from geojson.ts (two passes: the first finds the columns, their types and the
 * extent). Throws 'bad-option' without the SQLite binding, 'bad-output' when the disk refuses.
 */
export function writeGeoPackage(result: AuditResult, path: string): void {
  const Sqlite = loadGeoPackageSqlite();
  let db: InstanceType<SqliteBinding> | undefined;
  try {
    db = new Sqlite(path);
  } catch (e) {
    // only the place can refuse a new file (no such folder, no permission)
    throw new StopspanError('bad-output', `cannot write ${GPKG_FILE}: ${(e as Error).message}`);
  }
  try {
    // the file is new and removed whole on failure: the journal can stay in memory
    db.pragma('journal_mode = MEMORY');
    db.pragma(`application_id = ${GPKG_APPLICATION_ID}`);
    db.pragma(`user_version = ${GPKG_USER_VERSION}`);
    const conn = db;
    conn.transaction(() => {
      conn.exec(SCHEMA);
      const srs = conn.prepare(
        'INSERT INTO gpkg_spatial_ref_sys (srs_name, srs_id, organization, organization_coordsys_id, definition, description) VALUES (?, ?, ?, ?, ?, ?)',
      );
      for (const row of SRS_ROWS) srs.run(...row);
      const contents = conn.prepare(
        `INSERT INTO gpkg_contents (table_name, data_type, identifier, description, last_change, min_x, min_y, max_x, max_y, srs_id)
         VALUES (?, 'features', ?, ?, COALESCE(?, strftime('%Y-%m-%dT%H:%M:%fZ','now')), ?, ?, ?, ?, ?)`,
      );
      const geometryColumns = conn.prepare(
        'INSERT INTO gpkg_geometry_columns (table_name, column_name, geometry_type_name, srs_id, z, m) VALUES (?, ?, ?, ?, 0, 0)',
      );
      const contract = contractTypes();
      const changed = lastChange(result.generatedAt);
      for (const layer of LAYERS) {
        const shape = layerShape(layer.features(result), contract);
        // clause 2.1.6 (feature user data tables): an integer primary key, one geometry column of the
        // type gpkg_geometry_columns names, then the properties
        const columns = shape.columns.map(([name, type]) => `, ${ident(name)} ${type}`).join('');
        conn.exec(`CREATE TABLE ${ident(layer.table)} (fid INTEGER PRIMARY KEY AUTOINCREMENT, geom ${layer.geometryType}${columns})`);
        const b = shape.bounds;
        contents.run(
          layer.table,
          layer.table,
          layer.description,
          changed,
          b?.[0] ?? null,
          b?.[1] ?? null,
          b?.[2] ?? null,
          b?.[3] ?? null,
          SRS_ID,
        );
        geometryColumns.run(layer.table, 'geom', layer.geometryType, SRS_ID);
        if (shape.count === 0) continue;
        const names = shape.columns.map(([name]) => name);
        const insert = conn.prepare(
          `INSERT INTO ${ident(layer.table)} (geom${names.map((n) => ', ' + ident(n)).join('')}) VALUES (?${', ?'.repeat(names.length)})`,
        );
        const values: unknown[] = new Array(names.length + 1);
        for (const f of layer.features(result)) {
          values[0] = geoPackageGeometry(f.geometry);
          for (let i = 0; i < names.length; i++) {
            const v = f.properties[names[i]];
            values[i + 1] = typeof v === 'boolean' ? (v ? 1 : 0) : (v ?? null); // BOOLEAN is stored as 0 or 1 (Table 1)
          }
          insert.run(values);
        }
      }
    })();
    db.close();
    db = undefined;
  } catch (e) {
    db?.close();
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && DISK_FAULT.test(code)) {
      throw new StopspanError('bad-output', `cannot write ${GPKG_FILE}: ${(e as Error).message}`);
    }
    throw e;
  }
}

/** writeFolder's entry for the GeoPackage: written into the temporary folder with the other files. */
export function geoPackageFile(result: AuditResult): FileWriter {
  return { writeTo: (path) => writeGeoPackage(result, path) };
}
