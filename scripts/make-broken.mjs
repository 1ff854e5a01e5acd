// Writes the broken-feed corpus into fixtures/broken/: a minimal valid feed (folder and zip) and, derived
// from it, one small zip per kind of damage, plus cases.json saying what a careful tool should do with
// each (exit code, and the words its one-line error must contain: the file, and the field where there is
// one). The two large cases (a 10 MB line and a multi-gigabyte zip bomb) are generated only on request,
// into a temporary folder, so the committed corpus stays small. Deterministic: fixed zip timestamps.
//
// Usage: node scripts/make-broken.mjs [--out DIR]           the committed corpus (default fixtures/broken)
//        node scripts/make-broken.mjs --large --out DIR     only the large cases, plus DIR/cases-large.json

process.env.TZ = 'UTC'; // yazl writes DOS timestamps in local time; pin it so the bytes never vary

import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import zlib from 'node:zlib';
import yazl from 'yazl';

const ZIP_MTIME = new Date(Date.UTC(2026, 10, 1, 0, 0, 0));

// ---------------------------------------------------------------------------------------------------
// The minimal valid feed: two routes in Vellmoor, one weekday service, shapes for both

function minimalFeed() {
  const s1 = [0, 1, 2, 3, 4, 5].map((k) => [`S${k + 1}`, `Mill Ln / Stop ${k + 1}`, (45.02).toFixed(6), (10.03 + k * 0.0032).toFixed(6)]);
  const s2 = [0, 1, 2, 3].map((k) => [`T${k + 1}`, `Ferry St / Stop ${k + 1}`, (45.021 + k * 0.0025).toFixed(6), (10.029).toFixed(6)]);
  const hm = (minutes) => `${String(Math.floor(minutes / 60)).padStart(2, '0')}:${String(minutes % 60).padStart(2, '0')}:00`;
  const st = [];
  const addTrip = (tripId, stops, startMin) =>
    stops.forEach((s, i) => st.push(`${tripId},${hm(startMin + i)},${hm(startMin + i)},${s[0]},${i + 1}`));
  addTrip('M1-1', s1, 7 * 60);
  addTrip('M1-2', s1, 8 * 60);
  addTrip('M2-1', s2, 7 * 60 + 10);
  addTrip('M2-2', s2, 8 * 60 + 10);
  const shape = (id, stops) => stops.map((s, i) => `${id},${s[2]},${s[3]},${i + 1}`);
  return {
    'agency.txt':
      'agency_id,agency_name,agency_url,agency_timezone\nVTA,Vellmoor Transit Authority,https://transit.vellmoor.example/,Etc/GMT-1\n',
    'routes.txt': 'route_id,agency_id,route_short_name,route_long_name,route_type\nM1,VTA,M1,Mill Lane,3\nM2,VTA,M2,Ferry Street,3\n',
    'stops.txt': 'stop_id,stop_name,stop_lat,stop_lon\n' + [...s1, ...s2].map((r) => r.join(',')).join('\n') + '\n',
    'calendar.txt':
      'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWKDY,1,1,1,1,1,0,0,20261102,20270331\n',
    'trips.txt':
      'route_id,service_id,trip_id,direction_id,shape_id\nM1,WKDY,M1-1,0,SH1\nM1,WKDY,M1-2,0,SH1\nM2,WKDY,M2-1,0,SH2\nM2,WKDY,M2-2,0,SH2\n',
    'stop_times.txt': 'trip_id,arrival_time,departure_time,stop_id,stop_sequence\n' + st.join('\n') + '\n',
    'shapes.txt': 'shape_id,shape_pt_lat,shape_pt_lon,shape_pt_sequence\n' + [...shape('SH1', s1), ...shape('SH2', s2)].join('\n') + '\n',
  };
}

// ---------------------------------------------------------------------------------------------------
// Writers

/**
 * A zip of the given entries (name -> string or Buffer, or a list of [name, body] pairs, which may repeat
 * a name), in the given order, with fixed timestamps; the entries named in `stored` are not compressed.
 */
function zipBuffer(entries, stored = new Set()) {
  return new Promise((res, rej) => {
    const zip = new yazl.ZipFile();
    for (const [name, body] of Array.isArray(entries) ? entries : Object.entries(entries)) {
      const buf = Buffer.isBuffer(body) ? body : Buffer.from(body, 'utf8');
      const deflate = !stored.has(name);
      zip.addBuffer(buf, name, { mtime: ZIP_MTIME, mode: 0o100644, compress: deflate, compressionLevel: deflate ? 9 : 0 });
    }
    zip.end();
    const chunks = [];
    zip.outputStream.on('data', (c) => chunks.push(c));
    zip.outputStream.on('end', () => res(Buffer.concat(chunks)));
    zip.outputStream.on('error', rej);
  });
}

/** Replaces a name in a zip's local and central headers (same length): for names yazl rightly refuses. */
function renameInZip(buf, from, to) {
  if (Buffer.byteLength(from) !== Buffer.byteLength(to)) throw new Error('renameInZip: names must have the same length');
  const out = Buffer.from(buf);
  const needle = Buffer.from(from);
  let n = 0;
  for (let i = out.indexOf(needle); i >= 0; i = out.indexOf(needle, i + 1)) {
    Buffer.from(to).copy(out, i);
    n++;
  }
  if (n !== 2) throw new Error(`renameInZip: expected 2 occurrences of ${from}, found ${n}`);
  return out;
}

/** Sets the declared uncompressed size of one entry in its local and central headers. */
function declareSize(buf, name, size) {
  const out = Buffer.from(buf);
  const nameBuf = Buffer.from(name);
  for (let i = 0; i < out.length - 4; i++) {
    const sig = out.readUInt32LE(i);
    if (sig === 0x04034b50 && out.subarray(i + 30, i + 30 + nameBuf.length).equals(nameBuf)) out.writeUInt32LE(size, i + 22);
    if (sig === 0x02014b50 && out.subarray(i + 46, i + 46 + nameBuf.length).equals(nameBuf)) out.writeUInt32LE(size, i + 24);
  }
  return out;
}

/**
 * A zip whose stop_times.txt really inflates to `chunks` x 16 MiB of zeros. Deflate cannot beat about
 * 1000:1, so the compressed stream is built by repeating one fully flushed (self-contained, byte-aligned)
 * block of 16 MiB of zeros, then an empty final block: seconds to write, a few MB on disk. Written by hand
 * because the point is an entry no archiver would make; the other entries are the minimal feed's.
 */
function zipBombBuffer(chunks) {
  const zeros = Buffer.alloc(16 * 1024 * 1024);
  let crc = 0;
  for (let k = 0; k < chunks; k++) crc = zlib.crc32(zeros, crc);
  return craftedZip({ name: 'stop_times.txt', head: Buffer.alloc(0), body: zeros, times: chunks, crc, size: zeros.length * chunks });
}

/**
 * The minimal feed without stop_times.txt, plus a hand-made stop_times.txt entry: `head`, then `body`
 * repeated `times` times, each deflated once as a fully flushed block, declaring `size` and `crc` in its
 * headers (which may lie: that is the point of some cases).
 */
function craftedZip({ name, head, body, times, crc, size }) {
  const flushed = (b) => zlib.deflateRawSync(b, { level: 9, finishFlush: zlib.constants.Z_FULL_FLUSH });
  const block = flushed(body);
  const final = zlib.deflateRawSync(Buffer.alloc(0));
  const bomb = { name, crc, size, data: Buffer.concat([flushed(head), ...Array(times).fill(block), final]) };
  const feed = minimalFeed();
  delete feed[name];
  const entries = Object.entries(feed).map(([n, text]) => {
    const raw = Buffer.from(text, 'utf8');
    return { name: n, crc: zlib.crc32(raw), size: raw.length, data: zlib.deflateRawSync(raw) };
  });
  entries.push(bomb);
  const parts = [];
  const central = [];
  let offset = 0;
  for (const e of entries) {
    const name = Buffer.from(e.name);
    const lh = Buffer.alloc(30);
    lh.writeUInt32LE(0x04034b50, 0);
    lh.writeUInt16LE(20, 4); // version needed
    lh.writeUInt16LE(0, 6); // flags
    lh.writeUInt16LE(8, 8); // deflate
    lh.writeUInt16LE(0, 10); // time 00:00
    lh.writeUInt16LE(((2026 - 1980) << 9) | (11 << 5) | 1, 12); // 2026-11-01
    lh.writeUInt32LE(e.crc >>> 0, 14);
    lh.writeUInt32LE(e.data.length, 18);
    lh.writeUInt32LE(e.size, 22);
    lh.writeUInt16LE(name.length, 26);
    lh.writeUInt16LE(0, 28);
    const cd = Buffer.alloc(46);
    cd.writeUInt32LE(0x02014b50, 0);
    cd.writeUInt16LE(20, 4);
    lh.copy(cd, 6, 4, 30); // version needed .. name length, then extra length 0
    cd.writeUInt32LE(offset, 42);
    central.push(cd, name);
    parts.push(lh, name, e.data);
    offset += lh.length + name.length + e.data.length;
  }
  const cdBuf = Buffer.concat(central);
  const eocd = Buffer.alloc(22);
  eocd.writeUInt32LE(0x06054b50, 0);
  eocd.writeUInt16LE(entries.length, 8);
  eocd.writeUInt16LE(entries.length, 10);
  eocd.writeUInt32LE(cdBuf.length, 12);
  eocd.writeUInt32LE(offset, 16);
  return Buffer.concat([...parts, cdBuf, eocd]);
}

/** Writes a feed as a folder: the minimal feed's tables, with the given ones replaced. */
function writeFolder(dir, tables) {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  for (const [name, text] of Object.entries({ ...minimalFeed(), ...tables })) writeFileSync(join(dir, name), text);
}

// ---------------------------------------------------------------------------------------------------
// Edits of the minimal feed's tables

/** Replaces one line (1-based, header is line 1) of a table. */
function setLine(text, lineNo, line) {
  const lines = text.split('\n');
  lines[lineNo - 1] = line;
  return lines.join('\n');
}

function withTable(name, fn) {
  const feed = minimalFeed();
  feed[name] = fn(feed[name], feed);
  return feed;
}

// ---------------------------------------------------------------------------------------------------
// The cases. exit: 2 unusable input (one-line error naming `words`), 0 usable (warning: the code of the
// counted warning expected in summary.json).

async function committedCases() {
  const base = minimalFeed();
  const baseZip = await zipBuffer(base);
  const cases = [];
  const add = (c) => cases.push(c);

  add({ name: 'minimal-folder', path: 'minimal', exit: 0, words: [], why: 'the valid minimal feed, as a folder' });
  add({ name: 'minimal-zip', path: 'minimal.zip', exit: 0, words: [], why: 'the valid minimal feed, as a zip' });

  // archive-level damage
  add({
    name: 'truncated-zip',
    path: 'truncated.zip',
    bytes: baseZip.subarray(0, Math.floor(baseZip.length * 0.6)),
    exit: 2,
    words: ['truncated.zip'],
    why: 'the archive stops part way: no central directory',
  });
  {
    const bad = Buffer.from(baseZip);
    const cd = bad.indexOf(Buffer.from([0x50, 0x4b, 0x01, 0x02]));
    bad.writeUInt32LE(0x0badf00d, cd);
    add({
      name: 'bad-central-directory',
      path: 'bad-central-directory.zip',
      bytes: bad,
      exit: 2,
      words: ['bad-central-directory.zip'],
      why: 'the first central directory header has a wrong signature',
    });
  }
  add({
    name: 'zip-bomb-declared',
    path: 'zip-bomb-declared.zip',
    bytes: declareSize(baseZip, 'stop_times.txt', 4_000_000_000),
    exit: 2,
    words: ['stop_times.txt'],
    why: 'stop_times.txt declares 4 GB uncompressed: refuse before inflating',
  });
  {
    const feed = minimalFeed();
    const zip = await zipBuffer(without(feed, 'stops.txt', { 'xx/stops.txt': feed['stops.txt'] }));
    add({
      name: 'parent-path-entry',
      path: 'parent-path-entry.zip',
      bytes: renameInZip(zip, 'xx/stops.txt', '../stops.txt'),
      exit: 2,
      words: ['stops.txt'],
      why: 'stops.txt is stored as ../stops.txt: refuse the entry (never write it anywhere); without it the feed lacks stops',
    });
    const zip2 = await zipBuffer(without(feed, 'trips.txt', { _trips_txt: feed['trips.txt'] }));
    add({
      name: 'absolute-path-entry',
      path: 'absolute-path-entry.zip',
      bytes: renameInZip(zip2, '_trips_txt', '/trips.txt'),
      exit: 2,
      words: ['trips.txt'],
      why: 'trips.txt is stored as /trips.txt: refuse the absolute path; without it the feed lacks trips',
    });
  }
  {
    // stop_times.txt stored (not deflated), so one byte can be changed without breaking the deflate stream
    const bytes = await zipBuffer(base, new Set(['stop_times.txt']));
    const at = bytes.indexOf('M1-1,07:01:00') + 'M1-1,07:01:0'.length;
    bytes[at] = '9'.charCodeAt(0); // 07:01:00 -> 07:01:09: still a time, but not the one written
    add({
      name: 'crc-mismatch',
      path: 'crc-mismatch.zip',
      bytes,
      exit: 2,
      words: ['stop_times.txt', 'CRC-32'],
      why: 'one digit of a time in stop_times.txt changed after zipping: the CRC-32 in the headers no longer matches; refuse instead of reading a wrong time',
    });
    const twice = await zipBuffer([
      ...Object.entries(base),
      ['stops.txt', 'stop_id,stop_name,stop_lat,stop_lon\nS1,Elsewhere,45.1,10.1\n'],
    ]);
    add({
      name: 'entry-twice',
      path: 'entry-twice.zip',
      bytes: twice,
      exit: 2,
      words: ['stops.txt', 'two entries'],
      why: 'the archive holds two entries named stops.txt: which one is meant is unknowable (zip readers differ), so refuse naming it',
    });
  }
  {
    const nested = Object.fromEntries(Object.entries(base).map(([k, v]) => [`vellmoor-gtfs/${k}`, v]));
    add({
      name: 'nested-folder',
      path: 'nested-folder.zip',
      bytes: await zipBuffer(nested),
      exit: 0,
      words: [],
      why: 'every table inside one top-level folder, as many publishers zip them: valid',
    });
  }

  // table-level damage
  const table = async (name, file, text, exit, words, why, extra = {}) => {
    const feed = withTable(file, () => text);
    add({ name, path: `${name}.zip`, bytes: await zipBuffer(feed), exit, words, why, ...extra });
  };
  const t = minimalFeed();
  await table('empty-table', 'stops.txt', '', 2, ['stops.txt'], 'stops.txt has zero bytes: no header, no stops');
  await table(
    'empty-optional-table',
    'shapes.txt',
    '',
    0,
    [],
    'shapes.txt (optional) has zero bytes: fall back to straight lines and say so',
    { warning: 'empty-table' },
  );
  await table(
    'header-only',
    'stop_times.txt',
    'trip_id,arrival_time,departure_time,stop_id,stop_sequence\n',
    2,
    ['stop_times.txt'],
    'stop_times.txt has a header and no rows: no trip has stops',
  );
  await table(
    'duplicate-header',
    'stops.txt',
    t['stops.txt']
      .replace('stop_id,stop_name,stop_lat,stop_lon', 'stop_id,stop_name,stop_lat,stop_lon,stop_name')
      .split('\n')
      .map((l, i) => (i === 0 || l === '' ? l : l + ',Again'))
      .join('\n'),
    2,
    ['stops.txt', 'stop_name'],
    'stops.txt names the column stop_name twice: which one is meant is unknowable',
  );
  {
    const feed = minimalFeed();
    const text = Buffer.concat([
      Buffer.from(feed['stops.txt'].split('\n').slice(0, 2).join('\n') + '\n'),
      Buffer.from('S2,Caf'),
      Buffer.from([0xe9]),
      Buffer.from(' Corner,45.020000,10.033200\n'),
      Buffer.from(feed['stops.txt'].split('\n').slice(3).join('\n')),
    ]);
    feed['stops.txt'] = text;
    add({
      name: 'non-utf8',
      path: 'non-utf8.zip',
      bytes: await zipBuffer(feed),
      exit: 0,
      words: [],
      warning: 'invalid-utf8',
      why: 'a Latin-1 byte (0xE9) in a stop name: GTFS text is UTF-8; the name is damaged but the feed is usable, so replace the byte (U+FFFD) and count it with its place',
    });
  }
  await table(
    'unterminated-quote',
    'trips.txt',
    'route_id,service_id,trip_id,direction_id,shape_id,trip_headsign\nM1,WKDY,M1-1,0,SH1,"Mill Lane\nM1,WKDY,M1-2,0,SH1,Mill Lane\nM2,WKDY,M2-1,0,SH2,Ferry Street\nM2,WKDY,M2-2,0,SH2,Ferry Street\n',
    2,
    ['trips.txt', 'trip_headsign'],
    'a quote opened in trip_headsign on line 2 never closes',
  );
  {
    const feed = minimalFeed();
    feed['routes.txt'] = Buffer.from(feed['routes.txt'].replace('Mill Lane', 'Mill\u0000Lane'), 'utf8');
    add({
      name: 'nul-bytes',
      path: 'nul-bytes.zip',
      bytes: await zipBuffer(feed),
      exit: 2,
      words: ['routes.txt', 'route_long_name'],
      why: 'a NUL byte inside route_long_name',
    });
  }
  await table(
    'time-bad-minutes',
    'stop_times.txt',
    setLine(t['stop_times.txt'], 3, 'M1-1,25:99:00,25:99:00,S2,2'),
    2,
    ['stop_times.txt', 'arrival_time'],
    'arrival_time 25:99:00: hours may pass 24, minutes may not pass 59',
  );
  await table(
    'time-negative',
    'stop_times.txt',
    setLine(t['stop_times.txt'], 3, 'M1-1,07:01:00,-1:00:00,S2,2'),
    2,
    ['stop_times.txt', 'departure_time'],
    'departure_time -1:00:00',
  );
  await table(
    'lat-out-of-range',
    'stops.txt',
    setLine(t['stops.txt'], 3, 'S2,Mill Ln / Stop 2,95.020000,10.033200'),
    2,
    ['stops.txt', 'stop_lat'],
    'stop_lat 95: latitude lies in [-90, 90]',
  );
  await table(
    'lon-nan',
    'stops.txt',
    setLine(t['stops.txt'], 4, 'S3,Mill Ln / Stop 3,45.020000,NaN'),
    2,
    ['stops.txt', 'stop_lon'],
    'stop_lon NaN',
  );
  await table(
    'sequence-not-numeric',
    'stop_times.txt',
    setLine(t['stop_times.txt'], 4, 'M1-1,07:02:00,07:02:00,S3,third'),
    2,
    ['stop_times.txt', 'stop_sequence'],
    'stop_sequence "third"',
  );
  await table(
    'sequence-repeated',
    'stop_times.txt',
    setLine(t['stop_times.txt'], 4, 'M1-1,07:02:00,07:02:00,S3,2'),
    0,
    [],
    'trip M1-1 gives stop_sequence 2 twice: the order of its stops is unknowable; leave that trip out (or at least the repeated row), count it, audit the rest',
    { warning: 'repeated-stop-sequence' },
  );
  await table(
    'trips-missing-route',
    'trips.txt',
    t['trips.txt'].replace(/^M2,/gm, 'M9,'),
    0,
    [],
    'the M2 trips name route M9, which does not exist: skip them, count it, audit M1',
    { warning: 'trip-unknown-route' },
  );
  await table(
    'all-trips-missing-route',
    'trips.txt',
    t['trips.txt'].replace(/^M[12],/gm, 'MX,'),
    2,
    ['trips.txt', 'route_id'],
    'every trip names route MX, which does not exist: nothing is left',
  );
  {
    const feed = minimalFeed();
    feed['shapes.txt'] = feed['shapes.txt']
      .split('\n')
      .filter((l) => !/^SH2,/.test(l) || /,1$/.test(l))
      .join('\n');
    add({
      name: 'shape-one-point',
      path: 'shape-one-point.zip',
      bytes: await zipBuffer(feed),
      exit: 0,
      words: [],
      warning: 'pattern-without-shape',
      why: 'shape SH2 has a single point: no path; use straight lines for M2 and say so',
    });
  }
  {
    const feed = minimalFeed();
    feed['shapes.txt'] = feed['shapes.txt']
      .split('\n')
      .map((l) => (/^SH2,/.test(l) ? l.replace(/^SH2,[^,]+,[^,]+,/, 'SH2,45.021000,10.029000,') : l))
      .join('\n');
    add({
      name: 'shape-zero-length',
      path: 'shape-zero-length.zip',
      bytes: await zipBuffer(feed),
      exit: 0,
      words: [],
      warning: 'shape-zero-length',
      why: 'shape SH2 has four points all at one place: zero length; use straight lines for M2 and say so',
    });
  }
  {
    const feed = minimalFeed();
    feed['trips.txt'] += 'M2,WKDY,M2-3,0,SH2\n';
    feed['stop_times.txt'] += 'M2-3,09:10:00,09:10:00,T1,1\n';
    add({
      name: 'one-stop-pattern',
      path: 'one-stop-pattern.zip',
      bytes: await zipBuffer(feed),
      exit: 0,
      words: [],
      warning: 'trip-too-short',
      why: 'trip M2-3 serves a single stop: a pattern with no gap; skip it, count it',
    });
  }
  await table(
    'calendar-never-runs',
    'calendar.txt',
    'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWKDY,0,0,0,0,0,0,0,20261102,20270331\n',
    2,
    ['calendar.txt'],
    'the only service runs on no day of the week and calendar_dates adds none: no trip ever runs',
  );
  {
    const feed = minimalFeed();
    feed['calendar.txt'] += 'NEVER,1,1,1,1,1,0,0,20270331,20261102\n';
    feed['trips.txt'] = feed['trips.txt'].replace('M2,WKDY,M2-2', 'M2,NEVER,M2-2');
    add({
      name: 'one-service-never-runs',
      path: 'one-service-never-runs.zip',
      bytes: await zipBuffer(feed),
      exit: 0,
      words: [],
      warning: 'calendar-end-before-start',
      why: 'service NEVER ends before it starts: trip M2-2 never runs; the rest is usable',
    });
  }

  // missing pieces, and two valid oddities a reader must take in its stride
  add({
    name: 'not-a-zip',
    path: 'not-a-zip.zip',
    bytes: Buffer.from(base['stops.txt']),
    exit: 2,
    words: ['not-a-zip.zip'],
    why: 'a CSV file named .zip: no zip signature at all',
  });
  add({
    name: 'missing-table',
    path: 'missing-table.zip',
    bytes: await zipBuffer(without(base, 'stop_times.txt', {})),
    exit: 2,
    words: ['stop_times.txt'],
    why: 'the required table stop_times.txt is absent',
  });
  await table(
    'missing-column',
    'stops.txt',
    t['stops.txt']
      .split('\n')
      .map((l) => l.split(',').slice(0, 3).join(','))
      .join('\n'),
    2,
    ['stops.txt', 'stop_lon'],
    'stops.txt has no stop_lon column, and its stops are served',
  );
  {
    const feed = minimalFeed();
    for (const k of Object.keys(feed)) feed[k] = '\ufeff' + feed[k].replace(/\n/g, '\r\n');
    add({
      name: 'bom-crlf',
      path: 'bom-crlf.zip',
      bytes: await zipBuffer(feed),
      exit: 0,
      words: [],
      why: 'every table starts with a UTF-8 byte-order mark and ends lines with CRLF: valid, read as usual',
    });
  }
  await table(
    'padded-values',
    'stops.txt',
    t['stops.txt']
      .split('\n')
      .map((l, i) => (i === 0 || l === '' ? l : l.replace(/,(45\.\d+),(10\.\d+)$/, ', $1 ,  $2')))
      .join('\n'),
    0,
    [],
    'stop_lat and stop_lon padded with spaces, as some real feeds are: trim them and count it',
    { warning: 'padded-values' },
  );

  // values that would read as something else, and messages that must say what they saw
  await table(
    'quoted-blank-coordinate',
    'stops.txt',
    setLine(t['stops.txt'], 3, 'S2,Mill Ln / Stop 2," ",10.033200'),
    2,
    ['stops.txt:3', 'stop_lat', '" "'],
    'stop_lat is a quoted space: a value that is not a number, not 0 (a stop on the equator)',
  );
  await table(
    'hex-coordinate',
    'stops.txt',
    setLine(t['stops.txt'], 3, 'S2,Mill Ln / Stop 2,0x2D,10.033200'),
    2,
    ['stops.txt:3', 'stop_lat', '0x2D'],
    'stop_lat 0x2D: GTFS numbers are decimal; JavaScript would read 45',
  );
  await table(
    'binary-coordinate',
    'stops.txt',
    setLine(t['stops.txt'], 3, 'S2,Mill Ln / Stop 2,45.020000,0b1010'),
    2,
    ['stops.txt:3', 'stop_lon', '0b1010'],
    'stop_lon 0b1010: GTFS numbers are decimal; JavaScript would read 10',
  );
  await table(
    'time-overflow',
    'stop_times.txt',
    setLine(t['stop_times.txt'], 3, 'M1-1,596524:00:00,596524:00:00,S2,2'),
    2,
    ['stop_times.txt:3', 'arrival_time', '596524:00:00', '168:00:00'],
    'arrival_time 596524:00:00 is 2^31 seconds and more: past the bound of 168 hours',
  );
  {
    const feed = minimalFeed();
    feed['stops.txt'] = feed['stops.txt'].replace(/^T2,([^,]+),[^,]+,/m, 'T2,$1,89.999000,');
    add({
      name: 'stop-at-pole',
      path: 'stop-at-pole.zip',
      bytes: await zipBuffer(feed),
      exit: 0,
      words: [],
      warning: 'stop-coordinate-fault',
      why: 'stop T2 of the northbound M2 is typed at the North Pole: projected, it would land at the end of the shape and pull the stops after it there; keep it out of the distances (between its neighbours) and count it',
    });
  }
  {
    const feed = minimalFeed();
    feed['trips.txt'] = feed['trips.txt']
      .replace('trip_id,direction_id,shape_id', 'trip_id,direction_id,shape_id,trip_headsign')
      .replace(/(SH[12])\n/g, '$1,x\n')
      .replace('M1,WKDY,M1-2,0,SH1,x', 'M1,WKDY,M1-2,0,SH1,"Mill\nLa\u0000ne"');
    add({
      name: 'nul-in-quoted-lines',
      path: 'nul-in-quoted-lines.zip',
      bytes: await zipBuffer(feed),
      exit: 2,
      words: ['trips.txt:4', 'trip_headsign'],
      why: 'a NUL on the second line of a quoted trip_headsign that starts on line 3',
    });
  }
  {
    const feed = minimalFeed();
    feed['routes.txt'] = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(feed['routes.txt'], 'utf16le')]);
    add({
      name: 'utf16-bom',
      path: 'utf16-bom.zip',
      bytes: await zipBuffer(feed),
      exit: 2,
      words: ['routes.txt', 'UTF-16', 'UTF-8'],
      why: 'routes.txt is UTF-16 with a byte-order mark (FF FE): GTFS files are UTF-8',
    });
    const feed2 = minimalFeed();
    feed2['routes.txt'] = Buffer.from(feed2['routes.txt'], 'utf16le').swap16();
    add({
      name: 'utf16-no-bom',
      path: 'utf16-no-bom.zip',
      bytes: await zipBuffer(feed2),
      exit: 2,
      words: ['routes.txt', 'UTF-16', 'UTF-8'],
      why: 'routes.txt is big-endian UTF-16 without a byte-order mark: a NUL before every character',
    });
  }
  await table(
    'invisible-header',
    'stops.txt',
    t['stops.txt'].replace(/^stop_id/, '\u200bstop_id'),
    2,
    ['stops.txt', 'stop_id', '\\u200bstop_id', 'unseen'],
    'a zero-width space before stop_id in the header: show the names seen, escaped, and the near match',
  );
  await table(
    'rlo-in-stop-id',
    'stop_times.txt',
    setLine(t['stop_times.txt'], 4, 'M1-1,07:02:00,07:02:00,S\u202e3,3'),
    2,
    ['stop_times.txt:4', 'stop_id', 'S\\u202e3'],
    'stop_times names stop S<RIGHT-TO-LEFT OVERRIDE>3, not in stops.txt: the error shows the override escaped, not applied',
  );
  await table(
    'bom-only-optional-table',
    'shapes.txt',
    '\ufeff',
    0,
    [],
    'shapes.txt (optional) holds only a UTF-8 byte-order mark: read as absent, as a zero-byte table is, and say so',
    { warning: 'empty-table' },
  );
  return { base, baseZip, cases };
}

function without(feed, name, extra) {
  const out = {};
  for (const [k, v] of Object.entries(feed)) if (k !== name) out[k] = v;
  return { ...out, ...extra };
}

/** The large cases, written only on request (tests write them into a temporary folder). */
export async function makeLargeCases(outDir) {
  mkdirSync(outDir, { recursive: true });
  const cases = [];
  {
    const feed = minimalFeed();
    const lines = feed['stops.txt'].split('\n');
    // letters drawn from a seeded PRNG: deflate gets about 2:1, so no ratio cap can stand in for the line cap
    let seed = 12345;
    const name = Buffer.alloc(10 * 1024 * 1024);
    for (let i = 0; i < name.length; i++) {
      seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
      name[i] = 97 + ((seed >>> 16) % 16);
    }
    lines[2] = `S2,${name.toString('latin1')},45.020000,10.033200`;
    feed['stops.txt'] = lines.join('\n');
    writeFileSync(join(outDir, 'long-line.zip'), await zipBuffer(feed));
    cases.push({
      name: 'long-line',
      path: 'long-line.zip',
      exit: 2,
      words: ['stops.txt'],
      why: 'line 3 of stops.txt is 10 MB long: refuse past the line-length cap instead of buffering it',
      large: true,
    });
  }
  {
    writeFileSync(join(outDir, 'zip-bomb.zip'), zipBombBuffer(238));
    cases.push({
      name: 'zip-bomb',
      path: 'zip-bomb.zip',
      exit: 2,
      words: ['stop_times.txt'],
      why: 'stop_times.txt inflates to 4.0 GB of zeros (238 x 16 MiB) from about 4 MB: refuse by size or ratio',
      large: true,
    });
  }
  cases.push(...(await floodCases(outDir)));
  writeFileSync(join(outDir, 'cases-large.json'), JSON.stringify(cases, null, 2) + '\n');
  return cases;
}

/**
 * Floods of rows, patterns, entries and bytes, each a few MB on disk or written as a folder at test time,
 * and each with the time (s) and peak memory (MB) its run must stay within. Folders where a zip would be
 * refused by the compression-ratio cap before the case is reached.
 */
async function floodCases(outDir) {
  const cases = [];
  const base = minimalFeed();
  const stHead = 'trip_id,arrival_time,departure_time,stop_id,stop_sequence\n';
  const bounds = { maxSeconds: 30, maxMB: 1000 };
  {
    // one row of trip M1-1 repeated four million times, inside the trip's own run
    const lines = base['stop_times.txt'].split('\n');
    const flood = Buffer.alloc(lines[1].length * 4_000_000 + 4_000_000, `${lines[1]}\n`);
    writeFolder(join(outDir, 'row-flood'), {
      'stop_times.txt': Buffer.concat([Buffer.from(lines.slice(0, 2).join('\n') + '\n'), flood, Buffer.from(lines.slice(2).join('\n'))]),
    });
    cases.push({
      name: 'row-flood',
      path: 'row-flood',
      exit: 0,
      words: [],
      warning: 'repeated-stop-sequence',
      large: true,
      ...bounds,
      maxMB: 250,
      why: 'a row of stop_times.txt repeated 4 million times in its trip: drop the repeats as they come and count them',
    });
  }
  {
    // stop_times.txt declares 1 000 bytes and inflates to 1.8 GB of valid rows
    const row = 'M1-1,07:00:00,07:00:00,S1,1\n';
    const body = Buffer.from(row.repeat(Math.floor((16 << 20) / row.length)));
    writeFileSync(
      join(outDir, 'small-declared.zip'),
      craftedZip({ name: 'stop_times.txt', head: Buffer.from(stHead), body, times: 110, crc: 0, size: 1000 }),
    );
    cases.push({
      name: 'small-declared',
      path: 'small-declared.zip',
      exit: 2,
      words: ['stop_times.txt', 'declares'],
      large: true,
      ...bounds,
      maxMB: 300,
      why: 'stop_times.txt declares 1 000 bytes but inflates to 1.8 GB: refuse as soon as it passes its declared size',
    });
  }
  {
    const entries = [...Object.entries(base)];
    for (let k = 0; k < 20_000; k++) entries.push([`empty/${k}`, '']);
    writeFileSync(join(outDir, 'many-entries.zip'), await zipBuffer(entries, new Set(entries.slice(7).map((e) => e[0]))));
    cases.push({
      name: 'many-entries',
      path: 'many-entries.zip',
      exit: 2,
      words: ['many-entries.zip', 'entries'],
      large: true,
      ...bounds,
      maxMB: 300,
      why: 'the archive lists 20 007 entries, over the cap of 10 000: refuse before listing them',
    });
  }
  const twoStopTrips = (n) => {
    // stops on a grid 50 m apart, one two-stop trip for each ordered pair: each trip its own pattern
    const side = Math.ceil(Math.sqrt(n)) + 1;
    const stops = ['stop_id,stop_name,stop_lat,stop_lon'];
    for (let k = 0; k < side; k++)
      stops.push(`G${k},Grid ${k},${(45 + (k % 200) * 0.00045).toFixed(6)},${(10 + Math.floor(k / 200) * 0.00064).toFixed(6)}`);
    const trips = ['route_id,service_id,trip_id'];
    const st = [stHead.trimEnd()];
    let t = 0;
    for (let a = 0; a < side && t < n; a++) {
      for (let b = 0; b < side && t < n; b++) {
        if (a === b) continue;
        trips.push(`M1,WKDY,G${t}`);
        st.push(`G${t},08:00:00,08:00:00,G${a},1`, `G${t},08:02:00,08:02:00,G${b},2`);
        t++;
      }
    }
    return { 'stops.txt': stops.join('\n') + '\n', 'trips.txt': trips.join('\n') + '\n', 'stop_times.txt': st.join('\n') + '\n' };
  };
  {
    const { shapes, ...rest } = { ...base, ...twoStopTrips(20_000), shapes: undefined };
    writeFileSync(join(outDir, 'pattern-flood.zip'), await zipBuffer(rest));
    cases.push({
      name: 'pattern-flood',
      path: 'pattern-flood.zip',
      exit: 2,
      words: ['route patterns'],
      large: true,
      ...bounds,
      why: '20 000 two-stop trips, each its own route pattern, from a small zip: over the cap of 10 000 patterns',
    });
  }
  {
    writeFolder(join(outDir, 'trip-flood'), { ...twoStopTrips(1_000_000), 'shapes.txt': '' });
    cases.push({
      name: 'trip-flood',
      path: 'trip-flood',
      exit: 2,
      words: ['trips.txt', 'trip_id', 'G500000'],
      large: true,
      ...bounds,
      why: 'a million two-stop trips, each with its own stop list: over the cap of 500 000 trips, refused while trips.txt is read',
    });
  }
  {
    const n = 300_000;
    const stops = ['stop_id,stop_name,stop_lat,stop_lon'];
    const st = [stHead.trimEnd()];
    for (let k = 0; k < n; k++) {
      stops.push(`L${k},Long ${k},${(45 + (k % 1000) * 0.0005).toFixed(6)},${(10 + Math.floor(k / 1000) * 0.0007).toFixed(6)}`);
      st.push(`LONG,${k === 0 ? '07:00:00' : ''},${k === 0 ? '07:00:00' : ''},L${k},${k + 1}`);
    }
    writeFolder(join(outDir, 'long-trip'), {
      'stops.txt': stops.join('\n') + '\n',
      'trips.txt': 'route_id,service_id,trip_id\nM1,WKDY,LONG\n',
      'stop_times.txt': st.join('\n') + '\n',
      'shapes.txt': '',
    });
    cases.push({
      name: 'long-trip',
      path: 'long-trip',
      exit: 2,
      words: ['stop_times.txt', 'trip_id', 'LONG'],
      large: true,
      ...bounds,
      why: 'one trip of 300 000 stops: over the cap of stops per trip',
    });
  }
  {
    const name = 'Vellmoor '.repeat(100_000); // 900 KB
    const stops = base['stops.txt'] + Array.from({ length: 20 }, (_, k) => `X${k},${name},45.03,10.04`).join('\n') + '\n';
    writeFolder(join(outDir, 'long-names'), { 'stops.txt': stops });
    cases.push({
      name: 'long-names',
      path: 'long-names',
      exit: 2,
      words: ['stops.txt', 'stop_name'],
      large: true,
      ...bounds,
      why: 'stop names of 900 KB each: over the cap on a value',
    });
  }
  {
    const pts = ['shape_id,shape_pt_lat,shape_pt_lon,shape_pt_sequence'];
    for (let k = 0; k < 250_000; k++) pts.push(`SH1,${(45.02 + k * 1e-7).toFixed(7)},${(10.03 + k * 1e-7).toFixed(7)},${k + 1}`);
    writeFolder(join(outDir, 'long-shape'), { 'shapes.txt': pts.join('\n') + '\n' });
    cases.push({
      name: 'long-shape',
      path: 'long-shape',
      exit: 2,
      words: ['shapes.txt', 'SH1'],
      large: true,
      ...bounds,
      why: 'shape SH1 has 250 000 points: over the cap of points per shape',
    });
  }
  return cases;
}

/** Writes the committed corpus into outDir (replacing it). */
export async function makeBroken(outDir) {
  rmSync(outDir, { recursive: true, force: true });
  mkdirSync(join(outDir, 'minimal'), { recursive: true });
  const { base, baseZip, cases } = await committedCases();
  for (const [name, text] of Object.entries(base)) writeFileSync(join(outDir, 'minimal', name), text);
  writeFileSync(join(outDir, 'minimal.zip'), baseZip);
  const listed = [];
  for (const c of cases) {
    if (c.bytes) writeFileSync(join(outDir, c.path), c.bytes);
    const { bytes, ...rest } = c;
    listed.push(rest);
  }
  listed.push(
    {
      name: 'long-line',
      path: 'long-line.zip',
      exit: 2,
      words: ['stops.txt'],
      why: 'line 3 of stops.txt is 10 MB long (generated at test time: node scripts/make-broken.mjs --large --out DIR)',
      large: true,
    },
    {
      name: 'zip-bomb',
      path: 'zip-bomb.zip',
      exit: 2,
      words: ['stop_times.txt'],
      why: 'stop_times.txt inflates to 4.0 GB of zeros from about 4 MB (generated at test time)',
      large: true,
    },
  );
  writeFileSync(join(outDir, 'cases.json'), JSON.stringify(listed, null, 2) + '\n');
  return listed;
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const i = process.argv.indexOf('--out');
  const here = dirname(fileURLToPath(import.meta.url));
  const outDir = i >= 0 ? resolve(process.argv[i + 1]) : join(here, '..', 'fixtures', 'broken');
  if (process.argv.includes('--large')) await makeLargeCases(outDir);
  else await makeBroken(outDir);
}
