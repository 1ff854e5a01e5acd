// The kept trips' stop_times, folded while they are read. Most trips of a schedule repeat another trip's
// rows exactly (the same stops, stop_sequence values, distances and flags, and times shifted by a
// constant), so each trip keeps only a profile number and its start time, and each distinct run of rows is
// held once. Memory then grows with the distinct runs a schedule has, not with its trips or rows: the
// demo city enlarged sixteen times holds the profiles of the original. A trip's TripStopTimes is rebuilt
// from its profile when asked for.

import { StopspanError } from '../common/errors.js';
import { groupAndSort, RowColumns } from './columns.js';
import { MAX_STOPS_PER_TRIP, STOP_TIMES_FILE, type StopTimesSink } from './stopTimesRows.js';
import type { TripStopTimes } from './types.js';

/** One distinct run of stop_times rows; times are seconds after the trip's start time, -1 where blank. */
export interface StopTimesProfile {
  stopIdx: Int32Array;
  seq: Int32Array;
  arrRel: Int32Array;
  depRel: Int32Array;
  shapeDist: Float64Array;
  timepoint: Uint8Array;
  noService: Uint8Array;
  /** Profiles with the same stop list have the same number (and share the stopIdx array). */
  stopList: number;
}

/** A trip's profile and the time its profile's times count from. */
export interface TripProfile {
  profile: StopTimesProfile;
  profileId: number;
  baseS: number;
}

/** Rows of one trip, column by column, in [a, a + m). */
interface RowRun {
  stop: ArrayLike<number>;
  seq: ArrayLike<number>;
  arr: ArrayLike<number>;
  dep: ArrayLike<number>;
  dist: ArrayLike<number>;
  tp: ArrayLike<number>;
  ns: ArrayLike<number>;
}

const F64 = new Float64Array(1);
const F64_BITS = new Int32Array(F64.buffer);

function mix(h: number, v: number): number {
  return Math.imul(h ^ v, 0x01000193); // FNV-1a step over 32-bit words
}

function sameDist(x: number, y: number): boolean {
  return x === y || (x !== x && y !== y); // NaN (blank) equals NaN
}

/**
 * Caps on what the folded stop_times hold, so a feed of a million distinct trips is refused before its
 * profiles fill memory (each costs about a kilobyte besides its rows). Manhattan's buses on a weekday:
 * 2 295 profiles, 151 stop lists; a whole city's network is several times that.
 */
export const PROFILE_CAPS = {
  /** Distinct runs of rows (profiles). */
  profiles: 100_000,
  /** Rows summed over the profiles. */
  rows: 4_000_000,
  /** Distinct ordered stop lists (every one is at least one route pattern). */
  stopLists: 50_000,
} as const;

/** Finds or adds the profile of a trip's rows; the rows are sorted by stop_sequence and free of repeats. */
export class ProfileInterner {
  readonly profiles: StopTimesProfile[] = [];
  private rowsHeld = 0;
  private readonly byHash = new Map<number, number[]>();
  private readonly stopLists = new Map<number, { stops: Int32Array; id: number }[]>();
  private stopListCount = 0;

  intern(r: RowRun, a: number, m: number): { profileId: number; baseS: number } {
    let base = Infinity;
    for (let q = a; q < a + m; q++) {
      if (r.arr[q] >= 0 && r.arr[q] < base) base = r.arr[q];
      if (r.dep[q] >= 0 && r.dep[q] < base) base = r.dep[q];
    }
    if (base === Infinity) base = 0;
    let h = mix(0x811c9dc5, m);
    let hs = h;
    for (let q = a; q < a + m; q++) {
      hs = mix(hs, r.stop[q]);
      h = mix(h, r.stop[q]);
      h = mix(h, r.seq[q]);
      h = mix(h, r.arr[q] >= 0 ? r.arr[q] - base : -1);
      h = mix(h, r.dep[q] >= 0 ? r.dep[q] - base : -1);
      F64[0] = r.dist[q];
      h = mix(mix(h, F64_BITS[0]), F64_BITS[1]);
      h = mix(h, (r.tp[q] << 1) | r.ns[q]);
    }
    const bucket = this.byHash.get(h);
    if (bucket) {
      for (const id of bucket) if (this.matches(this.profiles[id], r, a, m, base)) return { profileId: id, baseS: base };
    }
    const p = this.add(r, a, m, base, hs);
    if (bucket) bucket.push(p);
    else this.byHash.set(h, [p]);
    return { profileId: p, baseS: base };
  }

  private matches(p: StopTimesProfile, r: RowRun, a: number, m: number, base: number): boolean {
    if (p.stopIdx.length !== m) return false;
    for (let q = 0; q < m; q++) {
      const x = a + q;
      if (p.stopIdx[q] !== r.stop[x] || p.seq[q] !== r.seq[x] || p.timepoint[q] !== r.tp[x] || p.noService[q] !== r.ns[x]) return false;
      if (p.arrRel[q] !== (r.arr[x] >= 0 ? r.arr[x] - base : -1) || p.depRel[q] !== (r.dep[x] >= 0 ? r.dep[x] - base : -1)) return false;
      if (!sameDist(p.shapeDist[q], r.dist[x])) return false;
    }
    return true;
  }

  private add(r: RowRun, a: number, m: number, base: number, stopsHash: number): number {
    this.rowsHeld += m;
    if (this.profiles.length >= PROFILE_CAPS.profiles || this.rowsHeld > PROFILE_CAPS.rows) {
      throw tooMany(`${PROFILE_CAPS.profiles} distinct runs of stop_times rows or ${PROFILE_CAPS.rows} rows in them`);
    }
    const p: StopTimesProfile = {
      stopIdx: new Int32Array(m),
      seq: new Int32Array(m),
      arrRel: new Int32Array(m),
      depRel: new Int32Array(m),
      shapeDist: new Float64Array(m),
      timepoint: new Uint8Array(m),
      noService: new Uint8Array(m),
      stopList: -1,
    };
    for (let q = 0; q < m; q++) {
      const x = a + q;
      p.stopIdx[q] = r.stop[x];
      p.seq[q] = r.seq[x];
      p.arrRel[q] = r.arr[x] >= 0 ? r.arr[x] - base : -1;
      p.depRel[q] = r.dep[x] >= 0 ? r.dep[x] - base : -1;
      p.shapeDist[q] = r.dist[x];
      p.timepoint[q] = r.tp[x];
      p.noService[q] = r.ns[x];
    }
    // the stop list: one number, and one array, per distinct list
    let lists = this.stopLists.get(stopsHash);
    if (!lists) this.stopLists.set(stopsHash, (lists = []));
    const same = lists.find((l) => l.stops.length === m && l.stops.every((s, q) => s === p.stopIdx[q]));
    if (same) {
      p.stopIdx = same.stops;
      p.stopList = same.id;
    } else {
      if (this.stopListCount >= PROFILE_CAPS.stopLists) throw tooMany(`${PROFILE_CAPS.stopLists} distinct stop lists`);
      p.stopList = this.stopListCount++;
      lists.push({ stops: p.stopIdx, id: p.stopList });
    }
    this.profiles.push(p);
    return this.profiles.length - 1;
  }
}

function tooMany(what: string): StopspanError {
  return new StopspanError('feed-too-large', `the trips of the day have more than ${what}, the cap`, { file: STOP_TIMES_FILE });
}

/** The trip's rows rebuilt from its profile. */
function materialise(p: StopTimesProfile, base: number): TripStopTimes {
  const m = p.stopIdx.length;
  const arrS = new Int32Array(m);
  const depS = new Int32Array(m);
  for (let q = 0; q < m; q++) {
    arrS[q] = p.arrRel[q] >= 0 ? p.arrRel[q] + base : -1;
    depS[q] = p.depRel[q] >= 0 ? p.depRel[q] + base : -1;
  }
  return { stopIdx: p.stopIdx, seq: p.seq, arrS, depS, shapeDist: p.shapeDist, timepoint: p.timepoint, noService: p.noService };
}

/**
 * stop_times per kept trip, read-only, as a Map of TripStopTimes (each built anew when asked for), in
 * the order of the kept trips; profile() gives the shared form without building anything.
 */
export class StopTimesStore implements ReadonlyMap<string, TripStopTimes> {
  readonly size: number;

  constructor(
    private readonly tripIds: readonly string[],
    private readonly tripIndex: ReadonlyMap<string, number>,
    private readonly profileOfTrip: Int32Array,
    private readonly baseOfTrip: Int32Array,
    readonly profiles: readonly StopTimesProfile[],
  ) {
    let n = 0;
    for (let k = 0; k < profileOfTrip.length; k++) if (profileOfTrip[k] >= 0) n++;
    this.size = n;
  }

  profile(tripId: string): TripProfile | undefined {
    const k = this.tripIndex.get(tripId);
    if (k === undefined || this.profileOfTrip[k] < 0) return undefined;
    const id = this.profileOfTrip[k];
    return { profile: this.profiles[id], profileId: id, baseS: this.baseOfTrip[k] };
  }

  get(tripId: string): TripStopTimes | undefined {
    const tp = this.profile(tripId);
    return tp && materialise(tp.profile, tp.baseS);
  }

  has(tripId: string): boolean {
    const k = this.tripIndex.get(tripId);
    return k !== undefined && this.profileOfTrip[k] >= 0;
  }

  *keys(): MapIterator<string> {
    for (let k = 0; k < this.profileOfTrip.length; k++) if (this.profileOfTrip[k] >= 0) yield this.tripIds[k];
  }

  *values(): MapIterator<TripStopTimes> {
    for (const [, v] of this.entries()) yield v;
  }

  *entries(): MapIterator<[string, TripStopTimes]> {
    for (let k = 0; k < this.profileOfTrip.length; k++) {
      const id = this.profileOfTrip[k];
      if (id >= 0) yield [this.tripIds[k], materialise(this.profiles[id], this.baseOfTrip[k])];
    }
  }

  [Symbol.iterator](): MapIterator<[string, TripStopTimes]> {
    return this.entries();
  }

  forEach(fn: (value: TripStopTimes, key: string, map: ReadonlyMap<string, TripStopTimes>) => void): void {
    for (const [k, v] of this.entries()) fn(v, k, this);
  }
}

/**
 * Profiles of any stop_times map: the store's own, or, for a Map of TripStopTimes built by hand (tests,
 * library users), profiles interned from it on the spot.
 */
export function tripProfiles(stopTimes: ReadonlyMap<string, TripStopTimes>): Pick<StopTimesStore, 'profile'> {
  if (stopTimes instanceof StopTimesStore) return stopTimes;
  const interner = new ProfileInterner();
  const of = new Map<string, { profileId: number; baseS: number }>();
  for (const [id, st] of stopTimes) {
    of.set(
      id,
      interner.intern(
        { stop: st.stopIdx, seq: st.seq, arr: st.arrS, dep: st.depS, dist: st.shapeDist, tp: st.timepoint, ns: st.noService },
        0,
        st.stopIdx.length,
      ),
    );
  }
  return {
    profile(tripId: string): TripProfile | undefined {
      const r = of.get(tripId);
      return r && { profile: interner.profiles[r.profileId], profileId: r.profileId, baseS: r.baseS };
    },
  };
}

/** Seen by a TripFolder's hook: trip t's rows, sorted and without repeats, valid during the call only. */
export type TripRowsHook = (t: number, rows: TripStopTimes) => void;

/** What a TripFolder does besides holding: a hook on every trip's rows, and which trips to hold. */
export interface TripFolderOptions {
  /** Called once per trip that has rows, with all of them, when its run ends. */
  onTrip?: TripRowsHook;
  /** Trips t with hold[t] === 0 run the hook and are counted, but are not held; every trip is held without it. */
  hold?: Uint8Array;
}

/**
 * Thrown by a TripFolder with a hook or a hold mask when a trip's rows come back after another trip's:
 * the rows of a trip not held cannot be gathered again, and the hook has seen part of a trip. The reader
 * then reads the table again without either (see readStopTimes in readFeed.ts).
 */
export class NotGroupedByTrip extends Error {
  constructor() {
    super('stop_times.txt is not grouped by trip');
  }
}

/** Per-trip flags of a TripFolder. */
const HAD_ROWS = 1;
const END_UNTIMED = 2;

/**
 * Where stop_times rows go while read: the rows of the trip being read are kept until its run ends, then
 * sorted, cleared of repeated stop_sequence values, shown to the hook, and folded into a profile if the
 * trip is held. When a trip's rows come back after another trip's (a table not grouped by trip), the
 * folding stops: that trip's rows so far and every later row are held whole and grouped at the end, as the
 * reader did before it folded, so such a table costs memory by its rows again (with a hook or a hold mask,
 * NotGroupedByTrip is thrown instead).
 */
export class TripFolder implements StopTimesSink {
  readonly interner = new ProfileInterner();
  readonly profileOfTrip: Int32Array;
  readonly baseOfTrip: Int32Array;
  /** Rows dropped for repeating their trip's previous stop_sequence. */
  repeated = 0;
  private readonly scratch = new RowColumns();
  private cur = -1;
  private spill: RowColumns | null = null;
  /** HAD_ROWS and END_UNTIMED per trip, held or not. */
  private readonly flags: Uint8Array;
  private readonly onTrip?: TripRowsHook;
  private readonly hold?: Uint8Array;

  constructor(
    private readonly trips: number,
    { onTrip, hold }: TripFolderOptions = {},
  ) {
    this.profileOfTrip = new Int32Array(trips).fill(-1);
    this.baseOfTrip = new Int32Array(trips);
    this.flags = new Uint8Array(trips);
    this.onTrip = onTrip;
    this.hold = hold;
  }

  /** Whether trip t had any rows (held or not). */
  hadRows(t: number): boolean {
    return (this.flags[t] & HAD_ROWS) !== 0;
  }

  /** Whether trip t lacks a time at its first or last stop. */
  endUntimed(t: number): boolean {
    return (this.flags[t] & END_UNTIMED) !== 0;
  }

  /** Whether the table turned out not grouped by trip. */
  scattered = false;

  push(t: number, stop: number, seq: number, arr: number, dep: number, dist: number, tp: number, ns: number): void {
    if (t !== this.cur) {
      this.fold();
      this.cur = t;
      if (this.hadRows(t) && (this.onTrip || this.hold)) throw new NotGroupedByTrip();
      if (this.profileOfTrip[t] >= 0) {
        // this trip's rows came before: from here on, hold rows whole (its own earlier ones first)
        this.spill ??= new RowColumns();
        this.scattered = true;
        this.unfold(t);
      }
    }
    if (this.spill) this.spill.push(t, stop, seq, arr, dep, dist, tp, ns);
    else this.scratch.push(t, stop, seq, arr, dep, dist, tp, ns);
  }

  /** Folds the last trip and any rows held whole; call once, after the last row. */
  finish(): void {
    this.fold();
    this.cur = -1;
    if (!this.spill) return;
    const flat = this.spill;
    this.spill = null;
    const { order, offsets } = groupAndSort(flat.owner, flat.seq, flat.used, this.trips);
    const s = this.scratch;
    for (let k = 0; k < this.trips; k++) {
      if (offsets[k] === offsets[k + 1]) continue;
      s.used = 0;
      for (let p = offsets[k]; p < offsets[k + 1]; p++) {
        const r = order[p];
        s.push(k, flat.stop[r], flat.seq[r], flat.arr[r], flat.dep[r], flat.dist[r], flat.tp[r], flat.ns[r]);
      }
      this.foldScratch(k);
    }
  }

  private fold(): void {
    if (this.cur < 0 || this.spill) return;
    this.foldScratch(this.cur);
  }

  private foldScratch(t: number): void {
    const s = this.scratch;
    if (s.used === 0) return;
    this.repeated += s.sortAndDedupe();
    // the reader caps each run of a trip's rows; a trip gathered from several runs is held to the same cap
    if (s.used > MAX_STOPS_PER_TRIP) {
      throw new StopspanError('feed-too-large', `a trip has more than ${MAX_STOPS_PER_TRIP} stop_times rows, the cap per trip`, {
        file: STOP_TIMES_FILE,
        column: 'trip_id',
      });
    }
    const m = s.used;
    // [GTFS Schedule reference: arrival and departure times are required at the first and last stop]
    this.flags[t] = HAD_ROWS | (s.arr[0] < 0 || s.dep[m - 1] < 0 ? END_UNTIMED : 0);
    this.onTrip?.(t, rowsOf(s, m));
    if (!this.hold || this.hold[t] === 1) {
      const { profileId, baseS } = this.interner.intern(s, 0, m);
      this.profileOfTrip[t] = profileId;
      this.baseOfTrip[t] = baseS;
    }
    s.used = 0;
  }

  /** Moves trip t's folded rows back into the rows held whole. */
  private unfold(t: number): void {
    const p = this.interner.profiles[this.profileOfTrip[t]];
    const st = materialise(p, this.baseOfTrip[t]);
    for (let q = 0; q < st.stopIdx.length; q++)
      (this.spill as RowColumns).push(
        t,
        st.stopIdx[q],
        st.seq[q],
        st.arrS[q],
        st.depS[q],
        st.shapeDist[q],
        st.timepoint[q],
        st.noService[q],
      );
    this.profileOfTrip[t] = -1;
  }
}

/** The first m rows of s as a trip's rows: views, not copies. */
function rowsOf(s: RowColumns, m: number): TripStopTimes {
  return {
    stopIdx: s.stop.subarray(0, m),
    seq: s.seq.subarray(0, m),
    arrS: s.arr.subarray(0, m),
    depS: s.dep.subarray(0, m),
    shapeDist: s.dist.subarray(0, m),
    timepoint: s.tp.subarray(0, m),
    noService: s.ns.subarray(0, m),
  };
}
