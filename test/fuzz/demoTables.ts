// Test helper for the fuzz test: the demo feed's tables as plain string grids, cut down to a few routes
// so one audit takes a few tens of milliseconds, and a writer that puts a (mutated) grid back on disk as
// a feed folder. The demo zip is opened with yauzl and its tables parsed with csv-parse, both outside the
// project's own reader, so the fuzz input does not depend on the code under test.

import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { readZip, writeZip } from '../helpers/zip.js';

export const ROOT = join(import.meta.dirname, '..', '..');
export const DEMO_ZIP = join(ROOT, 'fixtures', 'demo', 'demo-feed.zip');

/** One table: the header and its rows, every cell a string; raw cells are written verbatim (no quoting). */
export interface Table {
  header: string[];
  rows: string[][];
  raw?: Set<string>; // "row:col" (row -1 = header) of cells to write unquoted, so they can break the CSV
}
export type Tables = Record<string, Table>;

function toTable(text: string): Table {
  const grid = parse(text, { bom: true, relax_column_count: false }) as string[][];
  return { header: grid[0], rows: grid.slice(1) };
}

const col = (t: Table, name: string): number => {
  const i = t.header.indexOf(name);
  if (i < 0) throw new Error(`demo table lacks column ${name}`);
  return i;
};

/**
 * The demo feed cut down: routes R1 (with its short-turn pattern), R40 (frequency-based) and R41, every
 * 16th scheduled trip of R1 plus all frequency trips, and only the stops (with their parent stations) and
 * shapes those trips use. Calendars, agency and feed_info are kept whole.
 */
export async function demoBase(): Promise<Tables> {
  const texts = Object.fromEntries([...(await readZip(DEMO_ZIP, (n) => n.endsWith('.txt')))].map(([n, b]) => [n, b.toString('utf8')]));
  const all: Tables = {};
  for (const [name, text] of Object.entries(texts)) all[name] = toTable(text);
  const keepRoutes = new Set(['R1', 'R40', 'R41']);
  const routes = all['routes.txt'];
  routes.rows = routes.rows.filter((r) => keepRoutes.has(r[col(routes, 'route_id')]));
  const trips = all['trips.txt'];
  const [tRoute, tTrip, tShape] = [col(trips, 'route_id'), col(trips, 'trip_id'), col(trips, 'shape_id')];
  let k = 0;
  trips.rows = trips.rows.filter((r) => keepRoutes.has(r[tRoute]) && (r[tRoute] !== 'R1' || k++ % 16 === 0));
  const tripIds = new Set(trips.rows.map((r) => r[tTrip]));
  const shapeIds = new Set(trips.rows.map((r) => r[tShape]));
  const st = all['stop_times.txt'];
  st.rows = st.rows.filter((r) => tripIds.has(r[col(st, 'trip_id')]));
  const stopIds = new Set(st.rows.map((r) => r[col(st, 'stop_id')]));
  const stops = all['stops.txt'];
  const [sId, sParent] = [col(stops, 'stop_id'), col(stops, 'parent_station')];
  for (const r of stops.rows) if (stopIds.has(r[sId]) && r[sParent]) stopIds.add(r[sParent]);
  stops.rows = stops.rows.filter((r) => stopIds.has(r[sId]));
  const shapes = all['shapes.txt'];
  shapes.rows = shapes.rows.filter((r) => shapeIds.has(r[col(shapes, 'shape_id')]));
  const freq = all['frequencies.txt'];
  if (freq) freq.rows = freq.rows.filter((r) => tripIds.has(r[col(freq, 'trip_id')]));
  return all;
}

/** A deep copy, so each fuzz run mutates its own tables. */
export function cloneTables(t: Tables): Tables {
  const out: Tables = {};
  for (const [name, tab] of Object.entries(t)) {
    out[name] = { header: [...tab.header], rows: tab.rows.map((r) => [...r]), raw: new Set(tab.raw ?? []) };
  }
  return out;
}

/** RFC 4180 quoting, as a careful producer would write the cell. */
function quote(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Serialises one table: LF line ends, cells quoted when needed, raw cells verbatim. */
export function tableText(t: Table): string {
  const line = (cells: string[], r: number) => cells.map((c, i) => (t.raw?.has(`${r}:${i}`) ? c : quote(c))).join(',');
  return [line(t.header, -1), ...t.rows.map((row, r) => line(row, r))].join('\n') + '\n';
}

/** Writes the tables as a feed folder (created if needed). */
export function writeFeedFolder(t: Tables, dir: string): void {
  mkdirSync(dir, { recursive: true });
  for (const [name, tab] of Object.entries(t)) writeFileSync(join(dir, name), tableText(tab), 'utf8');
}

/** Writes the tables as a zip (yazl, fixed timestamps), the form agencies publish. */
export async function writeFeedZip(t: Tables, path: string): Promise<void> {
  await writeZip(
    path,
    Object.entries(t).map(([name, tab]) => [name, tableText(tab)] as const),
  );
}
