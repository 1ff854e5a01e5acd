#!/usr/bin/env node
// Makes the benchmark's scaling series: a GTFS feed (by default the Vellmoor demo feed) enlarged to k
// times its stop_times rows. Every trip is copied k-1 times with a new trip_id and its times shifted, so
// stops, shapes and route patterns stay exactly the same and only trips and stop_times grow. The output is
// deterministic (same input, same bytes), so figures from different runs compare.
//
//   node scripts/make-scaled.mjs [--in FEED.zip] [--out DIR] [--scales 1,4,16] [--shift-s 60]
//
// writes DIR/<name>-x<k>.zip for each k and prints one JSON line per file: { scale, file, stopTimesRows }.
// Defaults: --in fixtures/demo/demo-feed.zip, --out bench-out/scaled (git-ignored).

import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Readable } from 'node:stream';
import yauzl from 'yauzl';
import yazl from 'yazl';
import { parse } from 'csv-parse/sync';

const repoDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
/** A fixed modification time for every entry, so that the archive bytes do not depend on the clock. */
const FIXED_MTIME = new Date('2026-01-01T00:00:00Z');

/** The suffix of copy c's ids (copy 0 keeps the original ids). */
export function copySuffix(c) {
  return c === 0 ? '' : `~x${c}`;
}

/** Shifts an H:MM:SS time by shiftS seconds; blank stays blank. Hours may pass 24, as GTFS allows. */
export function shiftTime(text, shiftS) {
  const t = text.trim();
  if (t === '' || shiftS === 0) return text;
  const m = /^(\d+):([0-5]\d):([0-5]\d)$/.exec(t);
  if (!m) throw new Error(`not a GTFS time: ${JSON.stringify(text)}`);
  const s = Number(m[1]) * 3600 + Number(m[2]) * 60 + Number(m[3]) + shiftS;
  const hh = Math.floor(s / 3600);
  const mm = Math.floor((s % 3600) / 60);
  const ss = s % 60;
  return `${String(hh).padStart(2, '0')}:${String(mm).padStart(2, '0')}:${String(ss).padStart(2, '0')}`;
}

/** One CSV cell, quoted only when RFC 4180 requires it. */
function cell(v) {
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

function line(values) {
  return values.map(cell).join(',') + '\r\n';
}

/** Reads every entry of a zip into memory: [{ name, data: Buffer }] in archive order. */
export function readZip(file) {
  return new Promise((resolve, reject) => {
    const entries = [];
    yauzl.open(file, { lazyEntries: true, autoClose: true }, (err, zip) => {
      if (err) return reject(err);
      zip.on('entry', (entry) => {
        if (entry.fileName.endsWith('/')) return zip.readEntry();
        zip.openReadStream(entry, (e, stream) => {
          if (e) return reject(e);
          const chunks = [];
          stream.on('data', (c) => chunks.push(c));
          stream.on('error', reject);
          stream.on('end', () => {
            entries.push({ name: entry.fileName, data: Buffer.concat(chunks) });
            zip.readEntry();
          });
        });
      });
      zip.on('end', () => resolve(entries));
      zip.on('error', reject);
      zip.readEntry();
    });
  });
}

/** Parses a table to { header, rows } (rows as arrays of strings), dropping a UTF-8 byte-order mark. */
function readTable(data) {
  const records = parse(data, { bom: true, relax_column_count: true, skip_empty_lines: true });
  const [header = [], ...rows] = records;
  return { header: header.map((h) => h.trim()), rows };
}

/**
 * The rewritten text of one table for k copies, as a generator of string chunks (one chunk per copy), or
 * null when the table does not change.
 */
function scaledTable(name, data, k, shiftS) {
  const base = path.posix.basename(name);
  if (k === 1 || !['trips.txt', 'stop_times.txt', 'frequencies.txt'].includes(base)) return null;
  const { header, rows } = readTable(data);
  const col = (n) => header.indexOf(n);
  const tripCol = col('trip_id');
  if (tripCol < 0) throw new Error(`${name}: no trip_id column`);
  const timeCols =
    base === 'stop_times.txt'
      ? [col('arrival_time'), col('departure_time')].filter((i) => i >= 0)
      : base === 'frequencies.txt'
        ? [col('start_time'), col('end_time')].filter((i) => i >= 0)
        : [];
  const blockCol = base === 'trips.txt' ? col('block_id') : -1;
  return (function* () {
    yield line(header);
    for (let c = 0; c < k; c++) {
      const suffix = copySuffix(c);
      let out = '';
      for (const row of rows) {
        const r = row.slice();
        r[tripCol] = r[tripCol].trim() + suffix;
        if (blockCol >= 0 && r[blockCol] !== undefined && r[blockCol].trim() !== '') r[blockCol] = r[blockCol].trim() + suffix;
        for (const i of timeCols) if (r[i] !== undefined) r[i] = shiftTime(r[i], c * shiftS);
        out += line(r);
      }
      yield out;
    }
  })();
}

/** Counts the data rows of a table's text (records after the header). */
function countRows(data) {
  return readTable(data).rows.length;
}

/** Writes the feed enlarged k times to outFile; returns the number of stop_times rows written. */
export async function writeScaled(entries, k, outFile, { shiftS = 60 } = {}) {
  if (!Number.isInteger(k) || k < 1) throw new Error(`scale must be a whole number >= 1, got ${k}`);
  const zip = new yazl.ZipFile();
  let stopTimesRows = 0;
  for (const { name, data } of entries) {
    const chunks = scaledTable(name, data, k, shiftS);
    if (path.posix.basename(name) === 'stop_times.txt') stopTimesRows = countRows(data) * k;
    if (chunks) zip.addReadStream(Readable.from(chunks), name, { mtime: FIXED_MTIME, mode: 0o100644 });
    else zip.addBuffer(data, name, { mtime: FIXED_MTIME, mode: 0o100644 });
  }
  await writeZipFile(zip, outFile);
  return stopTimesRows;
}

/** Ends a yazl zip and writes it to outFile through a `.part` file renamed into place (no half-written zip). */
export async function writeZipFile(zip, outFile) {
  zip.end();
  await fs.promises.mkdir(path.dirname(outFile), { recursive: true });
  const tmp = `${outFile}.part`;
  await new Promise((resolve, reject) => {
    const ws = fs.createWriteStream(tmp);
    ws.on('close', resolve);
    ws.on('error', reject);
    zip.outputStream.on('error', reject).pipe(ws);
  });
  await fs.promises.rename(tmp, outFile);
}

function parseArgs(argv) {
  const opts = {
    in: path.join(repoDir, 'fixtures/demo/demo-feed.zip'),
    out: path.join(repoDir, 'bench-out/scaled'),
    scales: [1, 4, 16],
    shiftS: 60,
  };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const v = argv[i + 1];
    if (a === '--in') ((opts.in = v), i++);
    else if (a === '--out') ((opts.out = v), i++);
    else if (a === '--scales') ((opts.scales = v.split(',').map(Number)), i++);
    else if (a === '--shift-s') ((opts.shiftS = Number(v)), i++);
    else throw new Error(`invalid option ${a}: expected --in, --out, --scales or --shift-s`);
  }
  for (const k of opts.scales)
    if (!Number.isInteger(k) || k < 1) throw new Error(`invalid option --scales: expected whole numbers >= 1, got ${k}`);
  if (!Number.isInteger(opts.shiftS) || opts.shiftS < 0)
    throw new Error(`invalid option --shift-s: expected a whole number of seconds >= 0, got ${opts.shiftS}`);
  return opts;
}

async function main() {
  const opts = parseArgs(process.argv.slice(2));
  if (!fs.existsSync(opts.in)) throw new Error(`no input feed at ${opts.in}`);
  const entries = await readZip(opts.in);
  const stem = path
    .basename(opts.in)
    .replace(/\.zip$/i, '')
    .replace(/-feed$/, '');
  for (const k of opts.scales) {
    const file = path.join(opts.out, `${stem}-x${k}.zip`);
    const stopTimesRows = await writeScaled(entries, k, file, { shiftS: opts.shiftS });
    process.stdout.write(JSON.stringify({ scale: k, file, stopTimesRows }) + '\n');
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((e) => {
    process.stderr.write(`make-scaled: ${e?.message ?? e}\n`);
    process.exitCode = 2;
  });
}
