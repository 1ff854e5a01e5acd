// Reads a land-use layer: where people live and work, as a CSV of points (lat, lon and numeric columns) or
// a GeoJSON FeatureCollection of Point, MultiPoint, Polygon and MultiPolygon features with the same numeric
// properties, the way census blocks and tracts are exported. Every feature becomes one or more weighted
// points: a point is itself, a MultiPoint's people are split evenly over its points, a polygon's people are
// spread evenly over its area (polygonPieces.ts). Strict: no coordinates, an unknown or non-numeric column,
// a negative count or an invalid geometry is an error naming the file, the row or feature and the field.
// Bounded: the CSV is streamed 1 MiB at a time through the project's CSV reader; a GeoJSON file is refused
// above MAX_GEOJSON_BYTES before it is read; features, vertices and points are capped.

import { isAscii } from 'node:buffer';
import { closeSync, openSync, readSync, statSync, readFileSync } from 'node:fs';
import { readInPieces } from '../common/readInPieces.js';
import { parseDecimal } from '../common/decimal.js';
import { StopspanError } from '../common/errors.js';
import type { WarningSink } from '../common/warnings.js';
import { CsvTableParser, reportCsvStats } from '../gtfs/csv.js';
import type { CsvRow } from '../gtfs/csvCore.js';
import { polygonAreaAndPieces, polygonAreaM2, type PolygonPiece, type Ring } from './polygonPieces.js';

/** Most features (CSV data rows or GeoJSON features) a layer may have: a state's census blocks are a few hundred thousand. */
export const MAX_LAND_USE_FEATURES = 1_000_000;
/** Most polygon vertices a layer may have, over all its features. */
export const MAX_LAND_USE_VERTICES = 5_000_000;
/** Most weighted points the features may become (a large polygon is cut into up to MAX_CELLS of them). */
export const MAX_LAND_USE_POINTS = 4_000_000;
/** Largest GeoJSON file read (it is read whole, then parsed a feature at a time): 256 MiB. */
export const MAX_GEOJSON_BYTES = 256 << 20;

/** A numeric column of the layer and the weight of one of its units in trip ends. */
export interface LandUseColumn {
  name: string;
  weight: number;
}

/**
 * The columns read when none are named, and their weights: one resident and one job each count as one
 * person [D, a design choice: a commute has one end at a home and one at a workplace, so a resident and a
 * job draw trip ends alike; a planner with a local trip-generation study sets other weights].
 */
export const DEFAULT_LAND_USE_COLUMNS: readonly LandUseColumn[] = [
  { name: 'population', weight: 1 },
  { name: 'jobs', weight: 1 },
];

export interface LandUseLayer {
  file: string;
  format: 'csv' | 'geojson';
  columns: LandUseColumn[];
  /** Features read (CSV rows or GeoJSON features). */
  features: number;
  /** Where each feature was: its CSV line or its GeoJSON feature number (1-based). */
  featureRef: Int32Array;
  /** The weighted points: coordinates, the feature each comes from, its amount of each column and its people (weighted sum). */
  lat: Float64Array;
  lon: Float64Array;
  featureOf: Int32Array;
  amounts: Float64Array[];
  people: Float64Array;
  /** Sum of each column over the layer. */
  totals: number[];
  /** Sum of the people (weighted) over the layer. */
  totalPeople: number;
}

/** Parses `name=weight,name=weight` into columns; throws bad-option naming the part that is wrong. */
export function parseLandUseWeights(text: string): LandUseColumn[] {
  const out: LandUseColumn[] = [];
  for (const part of text.split(',')) {
    const p = part.trim();
    if (p === '') continue;
    const eq = p.indexOf('=');
    const name = (eq < 0 ? p : p.slice(0, eq)).trim();
    const w = eq < 0 ? 1 : parseDecimal(p.slice(eq + 1));
    if (name === '' || w === null || w < 0) {
      throw new StopspanError(
        'bad-option',
        'invalid option --land-use-weights: expected column=weight pairs with weights of 0 or more, comma-separated',
        { value: p },
      );
    }
    if (out.some((c) => c.name === name))
      throw new StopspanError('bad-option', `invalid option --land-use-weights: column ${name} given twice`, { value: text });
    out.push({ name, weight: w });
  }
  if (out.length === 0 || !out.some((c) => c.weight > 0)) {
    throw new StopspanError('bad-option', 'invalid option --land-use-weights: name at least one column with a weight above 0', {
      value: text,
    });
  }
  return out;
}

/** A Float64Array that grows (doubling) as values are pushed: no boxed numbers, no copy per point. */
class Float64List {
  data = new Float64Array(1024);
  length = 0;
  push(x: number): void {
    if (this.length === this.data.length) {
      const bigger = new Float64Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = x;
  }
  /** The values pushed, in an array of their own length. */
  take(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

/** Points gathered as features are read, with the caps. */
class LayerBuilder {
  lat = new Float64List();
  lon = new Float64List();
  featureOf: number[] = [];
  amounts: Float64List[];
  featureRef: number[] = [];
  vertices = 0;
  constructor(
    readonly file: string,
    readonly columns: LandUseColumn[],
  ) {
    this.amounts = columns.map(() => new Float64List());
  }

  feature(ref: string, refNo: number): number {
    if (this.featureRef.length >= MAX_LAND_USE_FEATURES) {
      throw new StopspanError('feed-too-large', `land-use file has more than ${MAX_LAND_USE_FEATURES} features, the cap`, {
        file: this.file,
        column: ref,
      });
    }
    this.featureRef.push(refNo);
    return this.featureRef.length - 1;
  }

  point(k: number, lat: number, lon: number, values: number[], share: number, ref: string): void {
    if (this.lat.length >= MAX_LAND_USE_POINTS) {
      throw new StopspanError('feed-too-large', `land-use file's features make more than ${MAX_LAND_USE_POINTS} points, the cap`, {
        file: this.file,
        column: ref,
      });
    }
    this.lat.push(lat);
    this.lon.push(lon);
    this.featureOf.push(k);
    for (let c = 0; c < values.length; c++) this.amounts[c].push(values[c] * share);
  }

  addVertices(n: number, ref: string): void {
    this.vertices += n;
    if (this.vertices > MAX_LAND_USE_VERTICES) {
      throw new StopspanError('feed-too-large', `land-use file has more than ${MAX_LAND_USE_VERTICES} polygon vertices, the cap`, {
        file: this.file,
        column: ref,
      });
    }
  }

  finish(format: 'csv' | 'geojson'): LandUseLayer {
    const n = this.lat.length;
    const amounts = this.amounts.map((a) => a.take());
    const people = new Float64Array(n);
    this.columns.forEach((c, ci) => {
      for (let i = 0; i < n; i++) people[i] += c.weight * amounts[ci][i];
    });
    const totals = amounts.map((a) => a.reduce((s, x) => s + x, 0));
    if (this.featureRef.length === 0) throw new StopspanError('bad-land-use', 'land-use file has no features', { file: this.file });
    return {
      file: this.file,
      format,
      columns: this.columns,
      features: this.featureRef.length,
      featureRef: Int32Array.from(this.featureRef),
      lat: this.lat.take(),
      lon: this.lon.take(),
      featureOf: Int32Array.from(this.featureOf),
      amounts,
      people,
      totals,
      totalPeople: people.reduce((s, x) => s + x, 0),
    };
  }
}

function count(value: unknown, file: string, where: { line?: number; feature?: string }, column: string): number {
  const n = typeof value === 'number' ? (Number.isFinite(value) ? value : null) : typeof value === 'string' ? parseDecimal(value) : null;
  const at = where.feature ? `${where.feature}: ` : '';
  if (n === null)
    throw new StopspanError('bad-land-use', `${at}invalid ${column}: expected a number`, {
      file,
      line: where.line,
      column,
      value: String(value),
    });
  if (n < 0)
    throw new StopspanError('bad-land-use', `${at}invalid ${column}: a count cannot be negative`, {
      file,
      line: where.line,
      column,
      value: String(value),
    });
  return n;
}

function coordinate(value: unknown, file: string, where: { line?: number; feature?: string }, column: 'lat' | 'lon'): number {
  const n = typeof value === 'number' ? (Number.isFinite(value) ? value : null) : typeof value === 'string' ? parseDecimal(value) : null;
  const limit = column === 'lat' ? 90 : 180;
  const at = where.feature ? `${where.feature}: ` : '';
  if (n === null || n < -limit || n > limit) {
    throw new StopspanError(
      'bad-land-use',
      `${at}invalid ${column}: expected a ${column === 'lat' ? 'latitude from -90 to 90' : 'longitude from -180 to 180'}`,
      { file, line: where.line, column, value: String(value) },
    );
  }
  return n;
}

/** CSV: a header with lat and lon and the columns asked for, then one point per row. */
class CsvLandUseReader {
  readonly parser: CsvTableParser;
  private iLat = -1;
  private iLon = -1;
  private iCols: number[] = [];
  builder: LayerBuilder | null = null;

  constructor(
    private readonly file: string,
    private readonly asked: LandUseColumn[] | null,
  ) {
    this.parser = new CsvTableParser(file, (row) => this.row(row), { onHeader: (h) => this.header(h) });
  }

  private header(header: string[]): void {
    const file = this.file;
    const col = new Map(header.map((h, i) => [h.trim().toLowerCase(), i]));
    for (const name of ['lat', 'lon'] as const) {
      if (!col.has(name))
        throw new StopspanError('bad-land-use', `land-use file lacks the column ${name}: every row needs coordinates (lat, lon)`, {
          file,
          line: 1,
          column: name,
        });
    }
    this.iLat = col.get('lat')!;
    this.iLon = col.get('lon')!;
    const columns = chooseColumns(this.asked, (name) => col.has(name.toLowerCase()), file, { line: 1 });
    this.iCols = columns.map((c) => col.get(c.name.toLowerCase())!);
    this.builder = new LayerBuilder(file, columns);
  }

  private row(f: CsvRow): void {
    const b = this.builder!;
    const line = f.line;
    const lat = coordinate(f.get(this.iLat), this.file, { line }, 'lat');
    const lon = coordinate(f.get(this.iLon), this.file, { line }, 'lon');
    const values = this.iCols.map((i, c) => count(f.get(i), this.file, { line }, b.columns[c].name));
    const k = b.feature(`line ${line}`, line);
    b.point(k, lat, lon, values, 1, `line ${line}`);
  }

  finish(warnings?: WarningSink): LandUseLayer {
    const stats = this.parser.end();
    if (this.parser.columns === null) this.header([]);
    if (warnings) reportCsvStats(warnings, this.file, this.parser.columns ?? [], stats);
    return this.builder!.finish('csv');
  }
}

/** The columns to read: those asked for (each must exist), or the defaults the file has (at least one). */
function chooseColumns(
  asked: LandUseColumn[] | null,
  has: (name: string) => boolean,
  file: string,
  where: { line?: number; feature?: string },
): LandUseColumn[] {
  const at = where.feature ? `${where.feature}: ` : '';
  if (asked) {
    for (const c of asked) {
      if (!has(c.name))
        throw new StopspanError('bad-land-use', `${at}land-use file lacks the column ${c.name} named in --land-use-weights`, {
          file,
          line: where.line,
          column: c.name,
        });
    }
    return asked;
  }
  const found = DEFAULT_LAND_USE_COLUMNS.filter((c) => has(c.name));
  if (found.length === 0) {
    throw new StopspanError(
      'bad-land-use',
      `${at}land-use file has neither ${DEFAULT_LAND_USE_COLUMNS.map((c) => c.name).join(' nor ')}; name its columns with --land-use-weights`,
      {
        file,
        line: where.line,
        column: DEFAULT_LAND_USE_COLUMNS[0].name,
      },
    );
  }
  return found.map((c) => ({ ...c }));
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/** A GeoJSON position checked: [lon, lat] numbers in range (the array itself, an altitude after them allowed). */
function position(p: unknown, file: string, feature: string): number[] {
  if (!Array.isArray(p) || p.length < 2 || typeof p[0] !== 'number' || typeof p[1] !== 'number') {
    throw new StopspanError('bad-land-use', `${feature}: invalid geometry: a position must be [lon, lat] numbers`, {
      file,
      column: 'geometry',
      value: JSON.stringify(p)?.slice(0, 80),
    });
  }
  if (!(p[0] >= -180 && p[0] <= 180)) coordinate(p[0], file, { feature }, 'lon');
  if (!(p[1] >= -90 && p[1] <= 90)) coordinate(p[1], file, { feature }, 'lat');
  return p as number[];
}

/** A polygon's rings checked (arrays of four or more positions, closed, with an area above zero), and its area. */
function polygonRings(coords: unknown, file: string, feature: string, b: LayerBuilder): { areaM2: number; pieces: PolygonPiece[] } {
  const bad = (why: string): StopspanError =>
    new StopspanError('bad-land-use', `${feature}: invalid geometry: ${why}`, { file, column: 'geometry' });
  if (!Array.isArray(coords) || coords.length === 0) throw bad('a polygon needs at least one ring');
  const rings: Ring[] = [];
  coords.forEach((ring, r) => {
    if (!Array.isArray(ring) || ring.length < 4) throw bad(`ring ${r + 1} has fewer than 4 positions`);
    b.addVertices(ring.length, feature);
    for (const p of ring) position(p, file, feature);
    const first = ring[0] as number[];
    const last = ring[ring.length - 1] as number[];
    if (first[0] !== last[0] || first[1] !== last[1]) throw bad(`ring ${r + 1} is not closed (its last position must repeat its first)`);
    rings.push(ring as number[][]);
  });
  const { areaM2, pieces } = polygonAreaAndPieces(rings);
  if (!(areaM2 > 0))
    throw bad(
      rings.length > 1 && polygonAreaM2(rings.slice(0, 1)) > 0 ? 'the holes cover the whole polygon' : 'the outer ring encloses no area',
    );
  return { areaM2, pieces };
}

/** Past the JSON value starting at i (a string, an object, an array, a number or a literal): its end, or -1 where the text ends first. */
function skipValue(text: string, i: number): number {
  const n = text.length;
  const c = text.charCodeAt(i);
  if (c === 0x22) return skipString(text, i);
  if (c === 0x7b || c === 0x5b) {
    let depth = 0;
    while (i < n) {
      const d = text.charCodeAt(i);
      if (d === 0x22) {
        i = skipString(text, i);
        if (i < 0) return -1;
        continue;
      }
      if (d === 0x7b || d === 0x5b) depth++;
      else if (d === 0x7d || d === 0x5d) {
        depth--;
        if (depth === 0) return i + 1;
      }
      i++;
    }
    return -1;
  }
  // a number or a literal: up to the next delimiter
  while (i < n) {
    const d = text.charCodeAt(i);
    if (d === 0x2c || d === 0x7d || d === 0x5d || d === 0x20 || d === 0x0a || d === 0x0d || d === 0x09) return i;
    i++;
  }
  return -1;
}

/** Past the string whose opening quote is at i, or -1. */
function skipString(text: string, i: number): number {
  const n = text.length;
  for (i++; i < n; i++) {
    const d = text.charCodeAt(i);
    if (d === 0x5c) i++;
    else if (d === 0x22) return i + 1;
  }
  return -1;
}

function skipSpace(text: string, i: number): number {
  for (;;) {
    const d = text.charCodeAt(i);
    if (d !== 0x20 && d !== 0x0a && d !== 0x0d && d !== 0x09) return i;
    i++;
  }
}

/**
 * Where a top-level object's one "features" array lies in the text (start, end) and where each of its
 * elements does (items: start, end pairs), found by a scan that follows strings and brackets only; null
 * for any text of another shape (the caller then parses it whole, which also checks what the scan does not).
 */
function featureSpans(text: string): { start: number; end: number; items: number[] } | null {
  let i = skipSpace(text, 0);
  if (text.charCodeAt(i) !== 0x7b) return null;
  i = skipSpace(text, i + 1);
  let start = -1;
  let end = -1;
  for (;;) {
    if (text.charCodeAt(i) !== 0x22) return null;
    const keyEnd = skipString(text, i);
    if (keyEnd < 0) return null;
    const key = text.slice(i + 1, keyEnd - 1);
    i = skipSpace(text, keyEnd);
    if (text.charCodeAt(i) !== 0x3a) return null;
    i = skipSpace(text, i + 1);
    const valueEnd = skipValue(text, i);
    if (valueEnd < 0) return null;
    if (key === 'features' || key.includes('\\')) {
      if (start >= 0 || key !== 'features' || text.charCodeAt(i) !== 0x5b) return null;
      start = i;
      end = valueEnd;
    }
    i = skipSpace(text, valueEnd);
    const d = text.charCodeAt(i);
    if (d === 0x2c) {
      i = skipSpace(text, i + 1);
      continue;
    }
    if (d !== 0x7d) return null;
    break;
  }
  if (start < 0 || skipSpace(text, i + 1) !== text.length) return null;
  const items: number[] = [];
  i = skipSpace(text, start + 1);
  if (text.charCodeAt(i) === 0x5d) return { start, end, items };
  for (;;) {
    const e = skipValue(text, i);
    if (e < 0) return null;
    items.push(i, e);
    i = skipSpace(text, e);
    const d = text.charCodeAt(i);
    if (d === 0x2c) i = skipSpace(text, i + 1);
    else if (d === 0x5d && i + 1 === end) return { start, end, items };
    else return null;
  }
}

function readGeoJson(file: string, asked: LandUseColumn[] | null): LandUseLayer {
  let size: number;
  try {
    size = statSync(file).size;
  } catch (e) {
    throw new StopspanError('bad-land-use', `cannot read land-use file: ${(e as Error).message}`, { file });
  }
  if (size > MAX_GEOJSON_BYTES)
    throw new StopspanError(
      'feed-too-large',
      `land-use GeoJSON file is larger than ${MAX_GEOJSON_BYTES >> 20} MiB, the cap (use CSV points, which are streamed)`,
      { file },
    );
  let text: string;
  try {
    const bytes = readFileSync(file);
    // ASCII (as exports mostly are) decodes as latin1, the same text at about half the cost of UTF-8 decoding
    text = isAscii(bytes) ? bytes.toString('latin1') : bytes.toString('utf8').replace(/^\uFEFF/, '');
  } catch (e) {
    throw new StopspanError('bad-land-use', `land-use file is not valid JSON: ${(e as Error).message}`, { file });
  }
  // A FeatureCollection is parsed a feature at a time (featureSpans), so each feature's objects are let go as
  // soon as it is read instead of the whole tree being held; anything amiss (a file that is not valid JSON, a
  // bad feature, a cap) and the file is read again whole, below, which reports the first problem as ever.
  const spans = featureSpans(text);
  if (spans) {
    try {
      const envelope: unknown = JSON.parse(text.slice(0, spans.start) + '[]' + text.slice(spans.end));
      if (
        isObject(envelope) &&
        envelope.type === 'FeatureCollection' &&
        Array.isArray(envelope.features) &&
        envelope.features.length === 0
      ) {
        const at = spans.items;
        return layerOfFeatures(file, asked, at.length / 2, (i) => JSON.parse(text.slice(at[2 * i], at[2 * i + 1])));
      }
    } catch {
      // read whole below
    }
  }
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    throw new StopspanError('bad-land-use', `land-use file is not valid JSON: ${(e as Error).message}`, { file });
  }
  const features: unknown[] =
    isObject(doc) && doc.type === 'FeatureCollection' && Array.isArray(doc.features)
      ? doc.features
      : isObject(doc) && doc.type === 'Feature'
        ? [doc]
        : [];
  if (
    !isObject(doc) ||
    (doc.type !== 'FeatureCollection' && doc.type !== 'Feature') ||
    (doc.type === 'FeatureCollection' && !Array.isArray(doc.features))
  ) {
    throw new StopspanError('bad-land-use', 'land-use GeoJSON must be a FeatureCollection (or one Feature)', {
      file,
      column: 'type',
      value: isObject(doc) ? String(doc.type) : typeof doc,
    });
  }
  return layerOfFeatures(file, asked, features.length, (i) => features[i]);
}

/** The layer from a collection's features, feature(i) the i-th (0-based) of n. */
function layerOfFeatures(file: string, asked: LandUseColumn[] | null, n: number, feature_: (i: number) => unknown): LandUseLayer {
  let b: LayerBuilder | null = null;
  for (let i = 0; i < n; i++) {
    const f = feature_(i);
    const feature = `feature ${i + 1}`;
    if (!isObject(f) || f.type !== 'Feature')
      throw new StopspanError('bad-land-use', `${feature}: not a GeoJSON Feature`, { file, column: 'type' });
    const props = isObject(f.properties) ? f.properties : {};
    if (!b)
      b = new LayerBuilder(
        file,
        chooseColumns(asked, (name) => name in props, file, { feature }),
      );
    const builder: LayerBuilder = b;
    const values = builder.columns.map((c) => {
      if (!(c.name in props)) throw new StopspanError('bad-land-use', `${feature}: lacks the property ${c.name}`, { file, column: c.name });
      return count(props[c.name], file, { feature }, c.name);
    });
    const g = f.geometry;
    if (!isObject(g))
      throw new StopspanError('bad-land-use', `${feature}: invalid geometry: none given (no coordinates)`, { file, column: 'geometry' });
    const k = builder.feature(feature, i + 1);
    const coords = g.coordinates;
    switch (g.type) {
      case 'Point': {
        const [lon, lat] = position(coords, file, feature);
        builder.point(k, lat, lon, values, 1, feature);
        break;
      }
      case 'MultiPoint': {
        if (!Array.isArray(coords) || coords.length === 0)
          throw new StopspanError('bad-land-use', `${feature}: invalid geometry: a MultiPoint needs at least one position`, {
            file,
            column: 'geometry',
          });
        builder.addVertices(coords.length, feature);
        const pts = coords.map((p) => position(p, file, feature));
        for (const [lon, lat] of pts) builder.point(k, lat, lon, values, 1 / pts.length, feature);
        break;
      }
      case 'Polygon':
      case 'MultiPolygon': {
        const polys = g.type === 'Polygon' ? [coords] : coords;
        if (!Array.isArray(polys) || polys.length === 0)
          throw new StopspanError('bad-land-use', `${feature}: invalid geometry: a MultiPolygon needs at least one polygon`, {
            file,
            column: 'geometry',
          });
        const parts = polys.map((c) => polygonRings(c, file, feature, builder));
        // the people over the parts by area, then over each part's pieces
        const total = parts.reduce((s, p) => s + p.areaM2, 0);
        for (const { areaM2, pieces } of parts) {
          for (const piece of pieces) builder.point(k, piece.lat, piece.lon, values, (areaM2 / total) * piece.share, feature);
        }
        break;
      }
      default:
        throw new StopspanError('bad-land-use', `${feature}: invalid geometry: expected Point, MultiPoint, Polygon or MultiPolygon`, {
          file,
          column: 'geometry',
          value: String(g.type),
        });
    }
  }
  if (!b) throw new StopspanError('bad-land-use', 'land-use file has no features', { file });
  return (b as LayerBuilder).finish('geojson');
}

/** Is the file GeoJSON? By its name (.geojson, .json), else by its first character that is not a space. */
function looksLikeGeoJson(file: string): boolean {
  if (/\.(geo)?json$/i.test(file)) return true;
  if (/\.csv$/i.test(file)) return false;
  try {
    const fd = openSync(file, 'r');
    try {
      const buf = Buffer.alloc(512);
      const n = readSync(fd, buf, 0, buf.length, 0);
      return /^(\uFEFF)?\s*\{/.test(buf.subarray(0, n).toString('utf8'));
    } finally {
      closeSync(fd);
    }
  } catch {
    return false;
  }
}

/**
 * Reads a land-use layer from a CSV or GeoJSON file. `columns` names the numeric columns and their weights
 * (parseLandUseWeights); absent, population and jobs, whichever the file has, at a weight of 1 each.
 */
export function readLandUse(
  file: string,
  { columns = null, warnings }: { columns?: LandUseColumn[] | null; warnings?: WarningSink } = {},
): LandUseLayer {
  if (looksLikeGeoJson(file)) return readGeoJson(file, columns);
  const r = new CsvLandUseReader(file, columns);
  readInPieces(file, (piece) => r.parser.push(piece), 'bad-land-use', 'land-use file');
  return r.finish(warnings);
}
