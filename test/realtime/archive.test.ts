// readArchive: order by header.timestamp, gzip by magic bytes, folder and zip alike, and every bad file
// counted and skipped. Snapshots are encoded with the published gtfs-realtime-bindings.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeZip } from '../helpers/zip.js';
import GtfsRealtimeBindings from 'gtfs-realtime-bindings';
import { readArchive, scanHeader, type ArchiveStats } from '../../src/realtime/index.js';
import { WarningSink } from '../../src/common/warnings.js';
import { isStopspanError } from '../../src/common/errors.js';

const rt = GtfsRealtimeBindings.transit_realtime;

function snapshot(timestamp: number | null, incrementality = rt.FeedHeader.Incrementality.FULL_DATASET, tripId = 'T1'): Buffer {
  const header: Record<string, unknown> = { gtfsRealtimeVersion: '2.0', incrementality };
  if (timestamp !== null) header.timestamp = timestamp;
  const msg = rt.FeedMessage.fromObject({
    header,
    entity: [{ id: 'v1', vehicle: { trip: { tripId }, vehicle: { id: 'bus-1' }, currentStopSequence: 3, timestamp: timestamp ?? 0 } }],
  });
  return Buffer.from(rt.FeedMessage.encode(msg).finish());
}

let dir: string;
let zipPath: string;
const files: [string, Buffer][] = [];

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-archive-'));
  const a = snapshot(1_800_000_100);
  files.push(
    ['a-first-by-name.pb', a], // ts 100: named first, read second
    ['b.pb', snapshot(1_800_000_050)], // ts 50
    ['c.bin', gzipSync(snapshot(1_800_000_150))], // gzip, detected by magic bytes whatever the name
    ['d-truncated.pb', a.subarray(0, a.length - 7)],
    ['e-not-protobuf.txt', Buffer.from('trip_id,arrival_time\nT1,08:00:00\n')],
    ['f-differential.pb', snapshot(1_800_000_200, rt.FeedHeader.Incrementality.DIFFERENTIAL)],
    ['g-no-timestamp.pb', snapshot(null)],
    ['h-bad-gzip.pb.gz', Buffer.from([0x1f, 0x8b, 8, 0, 1, 2, 3, 4, 5, 6])],
  );
  for (const [name, b] of files) writeFileSync(join(dir, name), b);
  zipPath = join(dir, '..', `${dir.split('/').pop()}.zip`);
  await writeZip(
    zipPath,
    [...files].reverse().map(([name, b]) => [`snapshots/${name}`, b] as const),
  );
});

afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
  rmSync(zipPath, { force: true });
});

async function readAll(p: string) {
  const warnings = new WarningSink();
  const stats: ArchiveStats = { filesSeen: 0, snapshotsRead: 0, snapshotsSkipped: 0 };
  const out: number[] = [];
  for await (const s of readArchive(p, { warnings, stats })) out.push(s.timestampS - 1_800_000_000);
  return { out, stats, warnings: new Map(warnings.list().map((w) => [w.code, w.count])) };
}

describe('readArchive', () => {
  for (const kind of ['folder', 'zip'] as const) {
    it(`yields the good snapshots of a ${kind} in header.timestamp order and counts every bad file`, async () => {
      const { out, stats, warnings } = await readAll(kind === 'folder' ? dir : zipPath);
      expect(out).toEqual([50, 100, 150]);
      expect(stats).toEqual({ filesSeen: 8, snapshotsRead: 3, snapshotsSkipped: 5 });
      expect(warnings.get('realtime-undecodable')).toBe(3); // truncated, not protobuf, bad gzip
      expect(warnings.get('realtime-differential')).toBe(1);
      expect(warnings.get('realtime-no-timestamp')).toBe(1);
    });
  }

  it('decodes with the published bindings what the bindings encoded', async () => {
    // round trip through gtfs-realtime-bindings (the published protobuf bindings)
    const snaps = [];
    for await (const s of readArchive(dir)) snaps.push(s);
    const v = snaps[0].message.entity[0].vehicle!;
    expect(v.trip!.tripId).toBe('T1');
    expect(v.vehicle!.id).toBe('bus-1');
    expect(v.currentStopSequence).toBe(3);
    expect(scanHeader(files[0][1]).gtfsRealtimeVersion).toBe('2.0');
  });

  it('rejects a truncated message at the header scan', () => {
    const a = files[0][1];
    expect(() => scanHeader(a.subarray(0, a.length - 3))).toThrow(/past the end|truncated/);
  });

  it('throws bad-realtime for a path that does not exist', async () => {
    const gen = readArchive(join(dir, 'nope'));
    await expect(gen.next()).rejects.toSatisfy((e: unknown) => isStopspanError(e) && e.code === 'bad-realtime');
  });
});
