#!/usr/bin/env node
// Makes a merged network for memory measurement: several copies of real feeds side by side in one feed,
// as a region's operators publish them merged. Every id of copy c of a feed (each column ending in _id
// but direction_id, and parent_station) gets the prefix `<feed><c>:`, so the copies are distinct
// networks that run on the same days; routes name their agency, since the merged feed has several. The
// output is deterministic (same inputs, same bytes) and is made at bench time, never committed.
//
//   node scripts/make-merged.mjs --out FILE.zip [--feeds DIR] [--copies nyct-bus-manhattan:6,nyct-subway:1]
//
// prints one JSON line: { file, stopTimesRows }.

import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Readable } from 'node:stream';
import yazl from 'yazl';
import { parse } from 'csv-parse/sync';
import { readZip, writeZipFile } from './make-scaled.mjs';

const repoDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const FIXED_MTIME = new Date('2026-01-01T00:00:00Z');
export const DEFAULT_COPIES = [
  ['nyct-bus-manhattan', 6],
  ['nyct-subway', 1],
];

function cell(v) {
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** Whether a column holds an id to namespace. */
function isId(column) {
  return (column.endsWith('_id') && column !== 'direction_id') || column === 'parent_station';
}

/**
 * Writes the merged feed of `copies` ([feed name, count] pairs, read from feedsDir/<name>.zip) to outFile;
 * returns the stop_times rows written.
 */
export async function writeMerged(feedsDir, copies, outFile) {
  // table name -> [{ header, rows, prefix }] in feed and copy order
  const parts = new Map();
  for (const [name, count] of copies) {
    const entries = await readZip(path.join(feedsDir, `${name}.zip`));
    for (const { name: entry, data } of entries) {
      if (!entry.endsWith('.txt') || entry.includes('/')) continue;
      const records = parse(data, { bom: true, relax_column_count: true, skip_empty_lines: true });
      const [header = [], ...rows] = records;
      const list = parts.get(entry) ?? [];
      for (let c = 0; c < count; c++) list.push({ header: header.map((h) => h.trim()), rows, prefix: `${name}${c}:`, agencyIds: null });
      parts.set(entry, list);
    }
  }
  // a route names its agency: the feed's one agency where routes.txt leaves it blank
  const agencyOf = new Map();
  for (const p of parts.get('agency.txt') ?? []) {
    const i = p.header.indexOf('agency_id');
    agencyOf.set(p.prefix, i >= 0 && p.rows.length ? p.rows[0][i] : '');
  }
  const zip = new yazl.ZipFile();
  let stopTimesRows = 0;
  for (const [entry, list] of [...parts].sort((a, b) => a[0].localeCompare(b[0]))) {
    const header = [...new Set(list.flatMap((p) => p.header))];
    if (entry === 'routes.txt' || entry === 'agency.txt') if (!header.includes('agency_id')) header.push('agency_id');
    const chunks = (function* () {
      yield header.map(cell).join(',') + '\r\n';
      for (const p of list) {
        const from = header.map((h) => p.header.indexOf(h));
        let out = '';
        for (const row of p.rows) {
          const r = header.map((h, j) => {
            const v = from[j] >= 0 ? (row[from[j]] ?? '').trim() : '';
            if (h === 'agency_id' && v === '' && (entry === 'routes.txt' || entry === 'agency.txt'))
              return p.prefix + (agencyOf.get(p.prefix) ?? '');
            return isId(h) && v !== '' ? p.prefix + v : v;
          });
          out += r.map(cell).join(',') + '\r\n';
        }
        if (entry === 'stop_times.txt') stopTimesRows += p.rows.length;
        yield out;
      }
    })();
    zip.addReadStream(Readable.from(chunks), entry, { mtime: FIXED_MTIME, mode: 0o100644 });
  }
  await writeZipFile(zip, outFile);
  return stopTimesRows;
}

function parseArgs(argv) {
  const opts = { out: null, feeds: process.env.STOPSPAN_FEEDS ?? path.join(repoDir, '../shared/feeds'), copies: DEFAULT_COPIES };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const v = argv[i + 1];
    if (a === '--out') ((opts.out = v), i++);
    else if (a === '--feeds') ((opts.feeds = v), i++);
    else if (a === '--copies') ((opts.copies = v.split(',').map((s) => [s.split(':')[0], Number(s.split(':')[1] ?? 1)])), i++);
    else throw new Error(`invalid option ${a}: expected --out, --feeds or --copies`);
  }
  if (!opts.out) throw new Error('--out FILE.zip is required');
  for (const [, k] of opts.copies)
    if (!Number.isInteger(k) || k < 1) throw new Error(`invalid option --copies: expected whole numbers >= 1, got ${k}`);
  return opts;
}

async function main() {
  const opts = parseArgs(process.argv.slice(2));
  const stopTimesRows = await writeMerged(opts.feeds, opts.copies, opts.out);
  process.stdout.write(JSON.stringify({ file: opts.out, stopTimesRows }) + '\n');
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((e) => {
    process.stderr.write(`make-merged: ${e?.message ?? e}\n`);
    process.exitCode = 2;
  });
}
