// Folding stop_times rows into shared profiles while they are read (src/gtfs/stopTimesStore.ts): what the
// store gives back for each trip must be exactly that trip's rows, grouped, sorted by stop_sequence
// (stably, ECMA-262's sort is stable [C]) and without repeated stop_sequence values, whatever the order of
// the rows; trips whose rows differ only by a time shift must share one profile.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readCsv } from '../../src/gtfs/csv.js';
import { NotGroupedByTrip, PROFILE_CAPS, StopTimesStore, TripFolder, tripProfiles } from '../../src/gtfs/stopTimesStore.js';
import {
  MAX_STOPS_PER_TRIP,
  STOP_TIMES_OPTIONAL,
  STOP_TIMES_REQUIRED,
  StopTimesRowReader,
  type StopTimesColumns,
} from '../../src/gtfs/stopTimesRows.js';
import { rejected } from '../helpers/errors.js';
import type { TripStopTimes } from '../../src/gtfs/types.js';

type Row = { t: number; stop: number; seq: number; arr: number; dep: number; dist: number; tp: number; ns: number };

function fold(rows: Row[], trips: number): { store: StopTimesStore; folder: TripFolder } {
  const folder = new TripFolder(trips);
  for (const r of rows) folder.push(r.t, r.stop, r.seq, r.arr, r.dep, r.dist, r.tp, r.ns);
  folder.finish();
  const ids = Array.from({ length: trips }, (_, k) => `T${k}`);
  const store = new StopTimesStore(
    ids,
    new Map(ids.map((id, k) => [id, k])),
    folder.profileOfTrip,
    folder.baseOfTrip,
    folder.interner.profiles,
  );
  return { store, folder };
}

/** The reference: each trip's rows in arrival order, stably sorted by seq, the first of each seq kept. */
function reference(rows: Row[], trips: number): { byTrip: Map<string, Row[]>; dropped: number } {
  const byTrip = new Map<string, Row[]>();
  let dropped = 0;
  for (let t = 0; t < trips; t++) {
    const mine = rows.filter((r) => r.t === t).sort((a, b) => a.seq - b.seq);
    const kept = mine.filter((r, k) => k === 0 || r.seq !== mine[k - 1].seq);
    dropped += mine.length - kept.length;
    if (kept.length > 0) byTrip.set(`T${t}`, kept);
  }
  return { byTrip, dropped };
}

function plain(st: TripStopTimes): Omit<Row, 't'>[] {
  return Array.from(st.stopIdx, (stop, q) => ({
    stop,
    seq: st.seq[q],
    arr: st.arrS[q],
    dep: st.depS[q],
    dist: st.shapeDist[q],
    tp: st.timepoint[q],
    ns: st.noService[q],
  }));
}

const rowArb = fc.record({
  t: fc.nat(5),
  stop: fc.nat(8),
  seq: fc.integer({ min: 0, max: 9 }),
  arr: fc.oneof(fc.constant(-1), fc.integer({ min: 0, max: 100_000 })),
  dep: fc.oneof(fc.constant(-1), fc.integer({ min: 0, max: 100_000 })),
  dist: fc.oneof(fc.constant(NaN), fc.double({ min: 0, max: 1e5, noNaN: true })),
  tp: fc.integer({ min: 0, max: 1 }),
  ns: fc.integer({ min: 0, max: 1 }),
});

describe('the folded stop_times store', () => {
  it('gives back every trip its own rows, sorted and without repeats, grouped or scattered', () => {
    fc.assert(
      fc.property(fc.array(rowArb, { maxLength: 80 }), fc.boolean(), (raw, grouped) => {
        // grouped: rows sorted by trip (stably), the usual layout of stop_times.txt
        const rows = grouped ? [...raw].sort((a, b) => a.t - b.t) : raw;
        const { store, folder } = fold(rows, 6);
        const want = reference(rows, 6);
        expect(folder.repeated).toBe(want.dropped);
        expect(store.size).toBe(want.byTrip.size);
        expect([...store.keys()]).toEqual([...want.byTrip.keys()]);
        for (const [id, mine] of want.byTrip) {
          expect(plain(store.get(id)!)).toEqual(mine.map(({ t: _t, ...r }) => r));
        }
        const reappears = rows.some((r, i) => i > 0 && rows[i - 1].t !== r.t && rows.slice(0, i).some((u) => u.t === r.t));
        expect(folder.scattered).toBe(reappears);
      }),
      { numRuns: 400, seed: 20261202 },
    );
  });

  it("shows every trip's rows to the hook once, sorted and without repeats, and holds only the trips asked for", () => {
    fc.assert(
      fc.property(
        fc.array(rowArb, { maxLength: 80 }),
        fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 6, maxLength: 6 }),
        (raw, mask) => {
          const rows = [...raw].sort((a, b) => a.t - b.t);
          const seen = new Map<string, Omit<Row, 't'>[]>();
          const folder = new TripFolder(6, {
            hold: Uint8Array.from(mask),
            onTrip: (t, st) => {
              expect(seen.has(`T${t}`)).toBe(false);
              seen.set(`T${t}`, plain(st));
            },
          });
          for (const r of rows) folder.push(r.t, r.stop, r.seq, r.arr, r.dep, r.dist, r.tp, r.ns);
          folder.finish();
          const want = reference(rows, 6);
          expect(folder.repeated).toBe(want.dropped);
          expect(Object.fromEntries(seen)).toEqual(
            Object.fromEntries([...want.byTrip].map(([id, m]) => [id, m.map(({ t: _t, ...r }) => r)])),
          );
          for (let t = 0; t < 6; t++) {
            expect(folder.hadRows(t)).toBe(want.byTrip.has(`T${t}`));
            expect(folder.profileOfTrip[t] >= 0).toBe(want.byTrip.has(`T${t}`) && mask[t] === 1);
            const mine = want.byTrip.get(`T${t}`);
            expect(folder.endUntimed(t)).toBe(mine !== undefined && (mine[0].arr < 0 || mine[mine.length - 1].dep < 0));
          }
        },
      ),
      { numRuns: 300, seed: 20261204 },
    );
  });

  it('refuses rows of a trip that come back, with a hook or a hold mask, as it cannot gather them again', () => {
    for (const options of [{ onTrip: () => {} }, { hold: new Uint8Array([1, 0]) }]) {
      const folder = new TripFolder(2, options);
      folder.push(0, 0, 1, 0, 0, NaN, 1, 0);
      folder.push(1, 0, 1, 0, 0, NaN, 1, 0);
      expect(() => folder.push(0, 1, 2, 60, 60, NaN, 1, 0)).toThrow(NotGroupedByTrip);
    }
  });

  it('holds trips that differ only by a time shift as one profile, and tells different ones apart', () => {
    const rows: Row[] = [];
    const trip = (t: number, start: number, dwell = 30, lastStop = 3) => {
      rows.push({ t, stop: 1, seq: 1, arr: start, dep: start, dist: 0, tp: 1, ns: 0 });
      rows.push({ t, stop: 2, seq: 2, arr: start + 120, dep: start + 120 + dwell, dist: 410.5, tp: 0, ns: 0 });
      rows.push({ t, stop: lastStop, seq: 3, arr: start + 300, dep: -1, dist: 900, tp: 1, ns: 0 });
    };
    trip(0, 6 * 3600);
    trip(1, 6 * 3600 + 600);
    trip(2, 25 * 3600); // after midnight, as GTFS allows
    trip(3, 7 * 3600, 45); // another dwell: another profile
    trip(4, 8 * 3600, 30, 4); // another last stop: another stop list too
    const { store } = fold(rows, 5);
    const p = [0, 1, 2, 3, 4].map((k) => store.profile(`T${k}`)!);
    expect(new Set(p.map((x) => x.profileId)).size).toBe(3);
    expect(p[1].profileId).toBe(p[0].profileId);
    expect(p[2].profileId).toBe(p[0].profileId);
    expect(p[3].profileId).not.toBe(p[0].profileId);
    expect(p[3].profile.stopList).toBe(p[0].profile.stopList);
    expect(p[4].profile.stopList).not.toBe(p[0].profile.stopList);
    expect(p.map((x) => x.baseS)).toEqual([21600, 22200, 90000, 25200, 28800]);
    expect([...store.get('T2')!.arrS]).toEqual([90000, 90120, 90300]);
    expect([...store.get('T2')!.depS]).toEqual([90000, 90150, -1]);
    expect(store.get('T9')).toBeUndefined();
    expect(store.has('T4')).toBe(true);
  });

  it('profiles a Map built by hand the same way', () => {
    const st = (start: number): TripStopTimes => ({
      stopIdx: Int32Array.from([4, 5]),
      seq: Int32Array.from([1, 2]),
      arrS: Int32Array.from([start, start + 90]),
      depS: Int32Array.from([start, start + 90]),
      shapeDist: Float64Array.from([NaN, NaN]),
      timepoint: Uint8Array.from([1, 1]),
      noService: Uint8Array.from([0, 0]),
    });
    const of = tripProfiles(
      new Map([
        ['a', st(100)],
        ['b', st(700)],
      ]),
    );
    expect(of.profile('a')!.profileId).toBe(of.profile('b')!.profileId);
    expect(of.profile('b')!.baseS).toBe(700);
    expect([...of.profile('b')!.profile.arrRel]).toEqual([0, 90]);
  });
});

/** Reads stop_times text (given in pieces) through the row reader into a folder; counts the rows handed on. */
async function readThrough(
  pieces: Iterable<string>,
  tripIds: string[],
): Promise<{ folder: TripFolder; reader: StopTimesRowReader; handed: number }> {
  const folder = new TripFolder(tripIds.length);
  let handed = 0;
  const sink = {
    push(t: number, stop: number, seq: number, arr: number, dep: number, dist: number, tp: number, ns: number) {
      handed++;
      folder.push(t, stop, seq, arr, dep, dist, tp, ns);
    },
  };
  const stopIndex = new Map(Array.from({ length: 9 }, (_, k) => [`S${k + 1}`, k] as [string, number]));
  const reader = new StopTimesRowReader({ tripIdx: new Map(tripIds.map((t, k) => [t, k])), stopIndex, station: new Uint8Array(9) }, sink);
  let cols = {} as StopTimesColumns;
  await readCsv(pieces, {
    file: 'stop_times.txt',
    onHeader: (h) => {
      cols = Object.fromEntries([...STOP_TIMES_REQUIRED, ...STOP_TIMES_OPTIONAL].map((c) => [c, h.indexOf(c)])) as StopTimesColumns;
    },
    onRow: (row) => reader.read(row, cols),
    groupKey: { column: 'trip_id', keep: (id) => reader.startTrip(id) },
  });
  folder.finish();
  return { folder, reader, handed };
}

describe('the stop_times row reader on floods of rows', () => {
  it('drops a row repeated millions of times as it comes, counting it, so nothing grows with the flood', async () => {
    const row = 'T1,08:00:00,08:00:00,S1,1\n';
    const piece = row.repeat(Math.floor((1 << 20) / row.length)); // about 40 000 rows a piece
    function* pieces() {
      yield 'trip_id,arrival_time,departure_time,stop_id,stop_sequence\n';
      for (let k = 0; k < 75; k++) yield piece; // about 3 million rows
      yield 'T1,08:05:00,08:05:00,S2,2\n';
    }
    const n = 75 * (piece.length / row.length);
    const { folder, reader, handed } = await readThrough(pieces(), ['T1']);
    expect(handed).toBe(2); // the first row of the repeated value and the next stop, nothing else held
    expect(reader.repeated + folder.repeated).toBe(n - 1);
    const p = folder.interner.profiles[folder.profileOfTrip[0]];
    expect(Array.from(p.stopIdx)).toEqual([0, 1]);
    expect(Array.from(p.depRel)).toEqual([0, 300]);
  });

  it('folds random tables with floods of repeated rows as the rows without the repeats (seeded)', async () => {
    const hms = (x: number) =>
      `${String(Math.floor(x / 3600)).padStart(2, '0')}:${String(Math.floor(x / 60) % 60).padStart(2, '0')}:${String(x % 60).padStart(2, '0')}`;
    const floodRow = fc.record({
      t: fc.nat(3),
      stop: fc.nat(8),
      seq: fc.integer({ min: 0, max: 6 }),
      arr: fc.integer({ min: 0, max: 90_000 }),
      times: fc.oneof(fc.constant(1), fc.integer({ min: 2, max: 400 })),
    });
    await fc.assert(
      fc.asyncProperty(fc.array(floodRow, { maxLength: 30 }), fc.boolean(), async (raw, grouped) => {
        const runs = grouped ? [...raw].sort((a, b) => a.t - b.t) : raw;
        const rows: Row[] = runs.flatMap((r) =>
          Array.from({ length: r.times }, () => ({ t: r.t, stop: r.stop, seq: r.seq, arr: r.arr, dep: r.arr, dist: NaN, tp: 1, ns: 0 })),
        );
        const text =
          'trip_id,arrival_time,departure_time,stop_id,stop_sequence\n' +
          rows.map((r) => `T${r.t},${hms(r.arr)},${hms(r.arr)},S${r.stop + 1},${r.seq}\n`).join('');
        const ids = ['T0', 'T1', 'T2', 'T3'];
        const { folder, reader, handed } = await readThrough([text], ids);
        const want = reference(rows, 4);
        expect(reader.repeated + folder.repeated).toBe(want.dropped);
        expect(handed).toBeLessThanOrEqual(runs.length); // a flood reaches the folder as one row
        const store = new StopTimesStore(
          ids,
          new Map(ids.map((id, k) => [id, k])),
          folder.profileOfTrip,
          folder.baseOfTrip,
          folder.interner.profiles,
        );
        expect([...store.keys()].sort()).toEqual([...want.byTrip.keys()].map((k) => `T${k.slice(1)}`).sort());
        for (const [id, mine] of want.byTrip) expect(plain(store.get(id)!)).toEqual(mine.map(({ t: _t, ...r }) => r));
      }),
      { numRuns: 200, seed: 20261203 },
    );
  });

  it('keeps the first row of a repeated stop_sequence whether repeats are adjacent or not, as sorting did', async () => {
    const text =
      'trip_id,arrival_time,departure_time,stop_id,stop_sequence\nT1,08:00:00,08:00:00,S1,1\nT1,09:00:00,09:00:00,S2,1\nT1,08:05:00,08:05:00,S2,2\nT1,10:00:00,10:00:00,S1,1\n';
    const { folder, reader } = await readThrough([text], ['T1']);
    expect(reader.repeated + folder.repeated).toBe(2);
    const p = folder.interner.profiles[folder.profileOfTrip[0]];
    expect(Array.from(p.stopIdx)).toEqual([0, 1]);
    expect(folder.baseOfTrip[0]).toBe(8 * 3600);
  });

  it('refuses a trip of more rows than the cap as too large, naming the line and trip', async () => {
    const rows = Array.from({ length: MAX_STOPS_PER_TRIP + 1 }, (_, k) => `LONG,,,S${1 + (k % 2)},${k + 1}`);
    const text = `trip_id,arrival_time,departure_time,stop_id,stop_sequence\n${rows.join('\n')}\n`;
    const e = await rejected(readThrough([text], ['LONG']));
    expect(e.code).toBe('feed-too-large');
    expect(e.context.line).toBe(MAX_STOPS_PER_TRIP + 2);
    expect(e.oneLine()).toContain('LONG');
    // one row fewer is read
    const ok = await readThrough([text.slice(0, text.lastIndexOf('LONG'))], ['LONG']);
    expect(ok.handed).toBe(MAX_STOPS_PER_TRIP);
  });
});

describe('the caps on folded stop_times', () => {
  const refused = (f: () => void) => {
    try {
      f();
    } catch (e) {
      return e as { code?: string; message?: string };
    }
    return {};
  };

  it(`refuses more than ${PROFILE_CAPS.stopLists} distinct stop lists, and holds that many`, () => {
    const n = PROFILE_CAPS.stopLists;
    const fill = (folder: TripFolder, lists: number) => {
      for (let t = 0; t < lists; t++) {
        folder.push(t, t, 1, 3600, 3600, NaN, 1, 0);
        folder.push(t, t + 1, 2, 3660, 3660, NaN, 1, 0);
      }
      folder.finish();
    };
    const ok = new TripFolder(n);
    fill(ok, n);
    expect(ok.interner.profiles).toHaveLength(n);
    const e = refused(() => fill(new TripFolder(n + 1), n + 1));
    expect(e.code).toBe('feed-too-large');
    expect(e.message).toContain('stop lists');
  });

  it(`refuses more than ${PROFILE_CAPS.profiles} distinct runs of rows`, () => {
    // one stop list, every trip with its own running time: a new profile each
    const folder = new TripFolder(PROFILE_CAPS.profiles + 1);
    const e = refused(() => {
      for (let t = 0; t <= PROFILE_CAPS.profiles; t++) {
        folder.push(t, 0, 1, 0, 0, NaN, 1, 0);
        folder.push(t, 1, 2, 60 + t, 60 + t, NaN, 1, 0);
      }
      folder.finish();
    });
    expect(e.code).toBe('feed-too-large');
    expect(folder.interner.profiles).toHaveLength(PROFILE_CAPS.profiles);
  });
});
