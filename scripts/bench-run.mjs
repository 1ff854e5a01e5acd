#!/usr/bin/env node
// One benchmark measurement, run in its own process so that its peak memory is that of the measured
// work alone. scripts/bench.mjs starts this once per measurement and reads the figures it leaves behind.
//
//   node scripts/bench-run.mjs inflate FEED.zip          floor (a): inflate stop_times.txt, count its lines
//   node scripts/bench-run.mjs inflate-reader FEED.zip   reference only: inflate stop_times.txt the way the audit's
//                                                        reader does (1 MiB reads and buffers), count its lines
//   node scripts/bench-run.mjs csv FEED.zip              floor (b): the project's CSV reader over stop_times.txt
//   node scripts/bench-run.mjs audit FEED.zip OUT_DIR    the full `stopspan audit FEED --out OUT_DIR --force` (dist/bin)
//   node scripts/bench-run.mjs stages FEED.zip OUT_DIR   the library stages one after another, each timed:
//                                                        readFeed, buildPatterns, runAudit, writeReport
//
// On exit the process writes one JSON object to the file named by $BENCH_RESULT (or to stdout when unset):
// { mode, rows, wallMs, userMs, sysMs, cpuMs, maxRssMB, stageMs, stageCpuMs, heldMB, exitCode, error }; heldMB
// (stages only) is the JavaScript heap plus buffers still in use after the last stage, once collected. wallMs counts from the start of
// the process (performance.timeOrigin), so node's own start-up is included in every measurement alike.

import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { performance } from 'node:perf_hooks';

const repoDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
/** The built code measured: $BENCH_DIST (bench.mjs builds its own copy there), else dist/. */
const distDir = path.resolve(process.env.BENCH_DIST ?? path.join(repoDir, 'dist'));
const [mode, feed, outDir] = process.argv.slice(2);

let rows = null;
let error = null;
let stageMs = null;
let stageCpuMs = null;
let heldMB = null;

process.on('exit', (code) => {
  const ru = process.resourceUsage(); // user/system CPU in microseconds, maxRSS in kilobytes
  const result = {
    mode,
    rows,
    wallMs: performance.now(),
    userMs: ru.userCPUTime / 1000,
    sysMs: ru.systemCPUTime / 1000,
    cpuMs: (ru.userCPUTime + ru.systemCPUTime) / 1000,
    maxRssMB: ru.maxRSS / 1024,
    stageMs,
    stageCpuMs,
    heldMB,
    exitCode: code,
    error,
  };
  const text = JSON.stringify(result) + '\n';
  if (process.env.BENCH_RESULT) fs.writeFileSync(process.env.BENCH_RESULT, text);
  else process.stdout.write(text);
});

/**
 * Opens stop_times.txt of a zip (or of a folder) as a stream of inflated bytes: through yauzl's own stream
 * (zlib's 16 KiB buffers), or with `readerWay` as the audit's reader does (see openZip in
 * src/gtfs/archive.ts): a deflated body read straight from the file in 1 MiB pieces, from the start its
 * local header gives, and inflated with 1 MiB output buffers.
 */
async function openStopTimes(feedPath, { readerWay = false } = {}) {
  if (fs.statSync(feedPath).isDirectory()) return fs.createReadStream(path.join(feedPath, 'stop_times.txt'));
  // loaded here, not at the top: the audit measured in this process loads only what stopspan loads
  const [{ default: yauzl }, { createInflateRaw }] = await Promise.all([import('yauzl'), import('node:zlib')]);
  return new Promise((resolve, reject) => {
    yauzl.open(feedPath, { lazyEntries: true, autoClose: true }, (err, zip) => {
      if (err) return reject(err);
      let found = false;
      zip.on('entry', (entry) => {
        if (path.posix.basename(entry.fileName) !== 'stop_times.txt') return zip.readEntry();
        found = true;
        if (!readerWay || entry.compressionMethod !== 8) return zip.openReadStream(entry, (e, stream) => (e ? reject(e) : resolve(stream)));
        zip.readLocalFileHeader(entry, { minimal: true }, (e, h) => {
          if (e) return reject(e);
          const body = fs.createReadStream(feedPath, {
            start: h.fileDataStart,
            end: h.fileDataStart + entry.compressedSize - 1,
            highWaterMark: 1 << 20,
          });
          resolve(body.pipe(createInflateRaw({ chunkSize: 1 << 20 })));
        });
      });
      zip.on('end', () => {
        if (!found) reject(new Error(`${feedPath}: no stop_times.txt`));
      });
      zip.on('error', reject);
      zip.readEntry();
    });
  });
}

/** Counts a stream's lines and returns them less the header: the rows. */
async function countRows(stream) {
  let lines = 0;
  let last = 10;
  for await (const chunk of stream) {
    let i = chunk.indexOf(10);
    while (i !== -1) {
      lines++;
      i = chunk.indexOf(10, i + 1);
    }
    if (chunk.length) last = chunk[chunk.length - 1];
  }
  if (last !== 10) lines++; // a final line without its newline
  return lines - 1;
}

/** Floor (a): inflate stop_times.txt and count its lines; rows = lines less the header. */
async function inflateAndCount(feedPath) {
  return countRows(await openStopTimes(feedPath));
}

/** For reference beside floor (a): the same count, inflating as the audit's reader does. */
async function inflateReaderWay(feedPath) {
  return countRows(await openStopTimes(feedPath, { readerWay: true }));
}

/**
 * Floor (b): the project's CSV reader alone over stop_times.txt, counting the rows it yields. The reader
 * (dist/gtfs/csv.js, readCsv) sees every record and does nothing with it.
 */
async function csvReaderCount(feedPath) {
  const csvPath = path.join(distDir, 'gtfs/csv.js');
  if (!fs.existsSync(csvPath)) throw new Error(`${csvPath} is not built yet`);
  const csv = await import(pathToFileURL(csvPath).href);
  const stream = await openStopTimes(feedPath);
  return countWithReader(csv, stream);
}

async function countWithReader(csv, stream) {
  if (typeof csv.readCsv !== 'function') {
    throw new Error(`dist/gtfs/csv.js has no readCsv export (exports: ${Object.keys(csv).join(', ')})`);
  }
  // readCsv(stream, { file, onHeader, onRow }) streams records to onRow and resolves to its counts.
  let n = 0;
  await csv.readCsv(stream, {
    file: 'stop_times.txt',
    onHeader: () => {},
    onRow: () => {
      n++;
    },
  });
  return n;
}

/** The full audit, exactly as a user runs it, in this process. */
async function audit(feedPath, out) {
  const mainPath = path.join(distDir, 'bin/stopspan.js'); // the bundle package.json's bin names
  if (!fs.existsSync(mainPath)) throw new Error(`${mainPath} is not built`);
  process.argv = [process.argv[0], mainPath, 'audit', feedPath, '--out', out, '--force'];
  await import(pathToFileURL(mainPath).href);
  // the command runs when imported; the figures are taken when the process exits.
}

/** The library's stages in turn, as the audit command composes them, with the time of each. */
async function stages(feedPath, out) {
  const load = (rel) => {
    const p = path.join(distDir, rel);
    if (!fs.existsSync(p)) throw new Error(`${p} is not built`);
    return import(pathToFileURL(p).href);
  };
  const [{ readFeed }, { buildPatterns }, { runAudit }, { writeReport }] = await Promise.all([
    load('gtfs/readFeed.js'),
    load('network/buildPatterns.js'),
    load('audit/runAudit.js'),
    load('report/writeReport.js'),
  ]);
  stageMs = {};
  stageCpuMs = {};
  let t = performance.now();
  let cpu = process.cpuUsage();
  stageMs.startup = t;
  stageCpuMs.startup = (cpu.user + cpu.system) / 1000;
  const lap = (name) => {
    const now = performance.now();
    const c = process.cpuUsage();
    stageMs[name] = now - t;
    stageCpuMs[name] = (c.user + c.system - cpu.user - cpu.system) / 1000;
    t = now;
    cpu = c;
  };
  const feedData = await readFeed(feedPath);
  lap('readFeed');
  const patterns = buildPatterns(feedData);
  lap('buildPatterns');
  const result = runAudit(feedData, patterns);
  lap('runAudit');
  await writeReport(result, out, { force: true });
  lap('writeReport');
  // what the audit holds once done, garbage collected away (the process runs with --expose-gc): the feed,
  // its patterns and the result are all still referenced here
  if (typeof globalThis.gc === 'function') {
    // let the writes' buffers go first (a turn of the event loop), then collect
    await new Promise((resolve) => setTimeout(resolve, 50));
    globalThis.gc();
    // native memory (inflate state, file buffers) is released by finalizers after the first collection
    await new Promise((resolve) => setTimeout(resolve, 50));
    globalThis.gc();
    const m = process.memoryUsage();
    heldMB = (m.heapUsed + m.external) / 2 ** 20;
  }
  if (!feedData || !patterns || !result) throw new Error('a stage returned nothing');
}

try {
  if (!feed) throw new Error('usage: bench-run.mjs inflate|inflate-reader|csv|audit|stages FEED [OUT_DIR]');
  if (mode === 'inflate') rows = await inflateAndCount(feed);
  else if (mode === 'inflate-reader') rows = await inflateReaderWay(feed);
  else if (mode === 'csv') rows = await csvReaderCount(feed);
  else if (mode === 'audit') {
    if (!outDir) throw new Error('audit needs an output folder');
    await audit(feed, outDir);
  } else if (mode === 'stages') {
    if (!outDir) throw new Error('stages needs an output folder');
    await stages(feed, outDir);
  } else throw new Error(`unknown mode ${JSON.stringify(mode)}`);
} catch (e) {
  error = String(e?.message ?? e);
  process.exitCode = 3;
}
