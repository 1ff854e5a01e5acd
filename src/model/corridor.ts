// A pattern seen as a line of demand: each existing stop's boardings and alightings per day are spread
// evenly over its catchment (from the midpoint with the stop before to the midpoint with the stop after,
// at most a set distance from the stop),
// so the walk and ride cost of ANY set of served stops (existing ones removed, new ones added) can be
// computed from prefix integrals. The optimiser, the verdicts and the what-if engine share it, so a
// stop's removal figure is exactly the change in the optimiser's objective.
//
// Riders passing a served stop are those with their origin before its catchment and their destination
// after it. Boardings and alightings do not say who rides where, so riders on board are taken to be alike:
// those alighting inside a catchment that spans several of today's stops come from the riders already on
// board and those boarding inside it in proportion to their numbers. That rule is exact when the counts
// come from trips whose lengths have no memory (exponential or uniform pairs, as the assumed ones: a test
// checks it against an enumeration of pairs); for counts from real riders it is an approximation.

import { stoppingProbability } from './stopping.js';
import type { StoppingModel } from './params.js';

export interface CorridorInput {
  posM: number[]; // distance along the pattern of each (passenger) stop, non-decreasing
  boardPerDay: number[];
  alightPerDay: number[];
  tripsPerDay: number;
  /** Riders come from at most this far from their stop (default: no limit); a long gap, such as a bridge,
   * then holds no trip ends in its middle. */
  catchmentHalfMaxM?: number;
}

export interface CostSettings {
  walkSpeedMps: number;
  walkWeight: number;
  lostTimePerStopS: number; // p
  stoppingModel: StoppingModel;
  /** Observed share of trips stopping at each existing stop (index = stop), null where unknown. */
  observedShare?: (number | null)[];
  /** Extra cost, in rider-seconds, per second of bus time (operating cost / value of time); 0 for none. */
  operatingPaxSPerBusS?: number;
}

export interface ServedStop {
  endsPerDay: number; // boardings + alightings assigned to the stop
  throughPerDay: number; // riders on board who pass the stop without using it
  lambdaPerTrip: number;
  probability: number;
  costS: number; // rider-seconds per day lost to the bus serving it (plus operating cost when set)
  busTimePerTripS: number; // expected seconds per trip the bus spends on it (p * P)
}

export class Corridor {
  readonly n: number;
  readonly posM: Float64Array;
  readonly tripsPerDay: number;
  readonly boardPerDay: Float64Array;
  readonly alightPerDay: Float64Array;
  private readonly lo: Float64Array;
  private readonly hi: Float64Array;
  private readonly cumB: Float64Array; // prefix over tiles (length n + 1)
  private readonly cumA: Float64Array;
  private readonly cumM: Float64Array; // prefix of trip ends times their mean position
  private readonly acc = new Float64Array(3); // what cumulative() found: boardings, alightings, moment
  private accTile = -1; // and the tile it was in (tileAt)
  /** What catchmentInto() found last. */
  catchEndsPerDay = 0;
  catchThroughPerDay = 0;

  constructor({ posM, boardPerDay, alightPerDay, tripsPerDay, catchmentHalfMaxM = Infinity }: CorridorInput) {
    const n = posM.length;
    if (n < 2) throw new RangeError(`Corridor: expected at least 2 stops, got ${n}`);
    if (boardPerDay.length !== n || alightPerDay.length !== n) throw new RangeError('Corridor: demand arrays must match the stops');
    for (let j = 1; j < n; j++)
      if (!(posM[j] >= posM[j - 1])) throw new RangeError(`Corridor: positions must be non-decreasing (stop ${j})`);
    this.n = n;
    this.posM = Float64Array.from(posM);
    this.tripsPerDay = tripsPerDay;
    this.boardPerDay = Float64Array.from(boardPerDay);
    this.alightPerDay = Float64Array.from(alightPerDay);
    this.lo = new Float64Array(n);
    this.hi = new Float64Array(n);
    this.cumB = new Float64Array(n + 1);
    this.cumA = new Float64Array(n + 1);
    this.cumM = new Float64Array(n + 1);
    for (let j = 0; j < n; j++) {
      this.lo[j] = j === 0 ? posM[0] : Math.max((posM[j - 1] + posM[j]) / 2, posM[j] - catchmentHalfMaxM);
      this.hi[j] = j === n - 1 ? posM[n - 1] : Math.min((posM[j] + posM[j + 1]) / 2, posM[j] + catchmentHalfMaxM);
      const e = boardPerDay[j] + alightPerDay[j];
      this.cumB[j + 1] = this.cumB[j] + boardPerDay[j];
      this.cumA[j + 1] = this.cumA[j] + alightPerDay[j];
      this.cumM[j + 1] = this.cumM[j] + (e * (this.lo[j] + this.hi[j])) / 2;
    }
  }

  /** The last tile whose lower edge is <= y, or -1. */
  private tileAt(y: number): number {
    if (y < this.lo[0]) return -1;
    let l = 0;
    let h = this.n - 1;
    while (l < h) {
      const mid = (l + h + 1) >> 1;
      if (this.lo[mid] <= y) l = mid;
      else h = mid - 1;
    }
    return l;
  }

  get startM(): number {
    return this.posM[0];
  }
  get endM(): number {
    return this.posM[this.n - 1];
  }

  /**
   * Integrals from the start to y, into `acc`: boardings, alightings, and trip ends times position. Written
   * into a scratch array, not returned as an object: the optimiser and the verdicts ask this millions of
   * times, and an object a call was a good share of the audit's garbage collection.
   */
  private cumulative(y: number): void {
    if (y < this.lo[0]) {
      this.accTile = -1;
      this.acc[0] = 0;
      this.acc[1] = 0;
      this.acc[2] = 0;
      return;
    }
    this.cumulativeIn(y, this.tileAt(y));
  }

  /** cumulative(y) where t = tileAt(y) is known. */
  private cumulativeIn(y: number, t: number): void {
    const acc = this.acc;
    this.accTile = t;
    const width = this.hi[t] - this.lo[t];
    const frac = width > 1e-9 ? Math.min(1, Math.max(0, (y - this.lo[t]) / width)) : 1;
    const bt = this.boardPerDay[t] * frac;
    const at = this.alightPerDay[t] * frac;
    const upto = this.lo[t] + frac * width;
    acc[0] = this.cumB[t] + bt;
    acc[1] = this.cumA[t] + at;
    acc[2] = this.cumM[t] + ((bt + at) * (this.lo[t] + upto)) / 2;
  }

  /** tileAt(y) for a y at or past tile `from`'s lower edge: a galloping search forward from it, a step or two for the sweep's next neighbour. */
  private tileFrom(y: number, from: number): number {
    const lo = this.lo;
    const last = this.n - 1;
    let l = from;
    let step = 1;
    while (l + step <= last && lo[l + step] <= y) {
      l += step;
      step *= 2;
    }
    let h = Math.min(last, l + step - 1);
    while (l < h) {
      const mid = (l + h + 1) >> 1;
      if (lo[mid] <= y) l = mid;
      else h = mid - 1;
    }
    return l;
  }

  /** Trip ends per day between u and v (u <= v). */
  endsBetween(u: number, v: number): number {
    const acc = this.acc;
    this.cumulative(u);
    const ub = acc[0];
    const ua = acc[1];
    this.cumulative(v);
    return acc[0] + acc[1] - ub - ua;
  }

  /** The stretch of line whose trip ends belong to existing stop j today. */
  tileBounds(j: number): { loM: number; hiM: number } {
    return { loM: this.lo[j], hiM: this.hi[j] };
  }

  /** Metres walked per day by the trip ends between u and v (u <= v) if all of them go to point x. */
  walkToPointM(u: number, v: number, x: number): number {
    if (!(v > u)) return 0;
    const acc = this.acc;
    let total = 0;
    const a = Math.min(v, x);
    if (a > u) {
      this.cumulative(u);
      const ub = acc[0];
      const ua = acc[1];
      const um = acc[2];
      this.cumulative(a);
      total += x * (acc[0] + acc[1] - ub - ua) - (acc[2] - um);
    }
    const b = Math.max(u, x);
    if (v > b) {
      this.cumulative(b);
      const bb = acc[0];
      const ba = acc[1];
      const bm = acc[2];
      this.cumulative(v);
      total += acc[2] - bm - x * (acc[0] + acc[1] - bb - ba);
    }
    return Math.max(0, total);
  }

  /** Riders on board at point y (boardings minus alightings before it), per day. */
  loadAt(y: number): number {
    this.cumulative(y);
    return Math.max(0, this.acc[0] - this.acc[1]);
  }

  /** Metres walked per day by the trip ends between two served stops at xi <= xk, each going to the nearer. */
  walkBetweenM(xi: number, xk: number): number {
    const acc = this.acc;
    const mid = (xi + xk) / 2;
    this.cumulative(xi);
    const ib = acc[0];
    const ia = acc[1];
    const im = acc[2];
    this.cumulative(mid);
    const mb = acc[0];
    const ma = acc[1];
    const mm = acc[2];
    this.cumulative(xk);
    const left = mm - im - xi * (mb + ma - ib - ia);
    const right = xk * (acc[0] + acc[1] - mb - ma) - (acc[2] - mm);
    return Math.max(0, left) + Math.max(0, right);
  }

  /** The riders of a stop served at `pos` whose neighbours served are at prev and next (null at the ends). */
  catchment(prevM: number | null, pos: number, nextM: number | null): { endsPerDay: number; throughPerDay: number } {
    this.catchmentInto(prevM, pos, nextM);
    return { endsPerDay: this.catchEndsPerDay, throughPerDay: this.catchThroughPerDay };
  }

  /** catchment() into the fields catchEndsPerDay and catchThroughPerDay, for the hot callers. */
  catchmentInto(prevM: number | null, pos: number, nextM: number | null): void {
    const acc = this.acc;
    const l = prevM === null ? this.startM : (prevM + pos) / 2;
    const r = nextM === null ? this.endM : (pos + nextM) / 2;
    this.cumulative(l);
    const lb = acc[0];
    const la = acc[1];
    this.cumulative(r);
    const ends = acc[0] + acc[1] - lb - la;
    this.catchEndsPerDay = ends;
    this.catchThroughPerDay = this.onBoardPassing(l, r, Math.max(0, lb - la));
  }

  // The state of a sweep (sweepFrom, sweepTo): the left edge of the catchment, what cumulative() found
  // there, and the riders carried through the whole tiles from the first one in it up to sweepTile.
  private sweepL = 0;
  private sweepLb = 0;
  private sweepLa = 0;
  private sweepTile = 0; // the first tile not yet carried through
  private sweepRTile = 0; // the tile of the right edge last asked
  private sweepCohort = 0;
  private sweepCarried = 0;

  /**
   * Starts a sweep of catchments with one left neighbour and one stop, for sweepTo() to end at right
   * neighbours further and further along. The optimiser asks the riders of a stop for every right
   * neighbour in its window; a catchment spans up to a window of tiles, so answering each afresh made the
   * audit's time grow with the cube of the window (stops a few metres apart: minutes a pattern). A sweep
   * carries the riders through each tile once, doing the same arithmetic in the same order, so its answers
   * are those of catchmentInto exactly.
   */
  sweepFrom(prevM: number, pos: number): void {
    const acc = this.acc;
    const l = (prevM + pos) / 2;
    this.cumulative(l);
    this.sweepL = l;
    this.sweepLb = acc[0];
    this.sweepLa = acc[1];
    this.sweepTile = Math.max(0, this.accTile);
    this.sweepRTile = this.sweepTile;
    this.sweepCohort = Math.max(0, acc[0] - acc[1]);
    this.sweepCarried = this.sweepCohort;
  }

  /**
   * catchmentInto(prevM, pos, nextM) for the prevM and pos of the last sweepFrom(), into the same fields;
   * nextM must not be less than in the call before it since that sweepFrom().
   */
  sweepTo(pos: number, nextM: number): void {
    const acc = this.acc;
    const l = this.sweepL;
    const r = (pos + nextM) / 2;
    // r's tile: at or past the last one's (r never falls), found from it
    if (r < this.lo[0]) this.cumulative(r);
    else this.cumulativeIn(r, this.tileFrom(r, Math.max(0, this.sweepRTile)));
    const t1 = this.accTile; // tileAt(r)
    this.sweepRTile = t1;
    this.catchEndsPerDay = acc[0] + acc[1] - this.sweepLb - this.sweepLa;
    // the tiles before r's own lie whole inside [l, r] for this r and every later one: carry through them once
    let cohort = this.sweepCohort;
    let carried = this.sweepCarried;
    let t = this.sweepTile;
    for (; t < t1 && cohort > 0; t++) {
      const part = 1 - this.fracAt(t, l);
      if (!(part > 0)) continue;
      const alight = this.alightPerDay[t] * part;
      if (carried > 0) cohort -= Math.min(cohort, (alight * cohort) / carried);
      carried = Math.max(0, carried - alight) + this.boardPerDay[t] * part;
    }
    if (t < t1) t = t1; // the cohort ran out: no later tile changes the answer
    this.sweepTile = t;
    this.sweepCohort = cohort;
    this.sweepCarried = carried;
    // r's own tile, in part
    if (t1 === t && cohort > 0) {
      const part = this.fracAt(t1, r) - this.fracAt(t1, l);
      if (part > 0) {
        const alight = this.alightPerDay[t1] * part;
        if (carried > 0) cohort -= Math.min(cohort, (alight * cohort) / carried);
      }
    }
    this.catchThroughPerDay = Math.max(0, cohort);
  }

  /**
   * Of the riders on board at l, those still on board at r. Tile by tile (the part of each
   * inside [l, r]), those alighting come from everyone on board then, the riders on board at l in
   * proportion to their share; riders boarding in a tile alight in a later one. A catchment of one whole
   * tile (a stop served between its own neighbours) gives on board minus alighting, as it must.
   */
  private onBoardPassing(l: number, r: number, onBoardAtL: number): number {
    const t0 = Math.max(0, this.tileAt(l));
    const t1 = this.tileAt(r);
    let cohort = onBoardAtL;
    let carried = onBoardAtL;
    for (let t = t0; t <= t1 && cohort > 0; t++) {
      const part = this.fracAt(t, r) - this.fracAt(t, l);
      if (!(part > 0)) continue;
      const alight = this.alightPerDay[t] * part;
      if (carried > 0) cohort -= Math.min(cohort, (alight * cohort) / carried);
      carried = Math.max(0, carried - alight) + this.boardPerDay[t] * part;
    }
    return Math.max(0, cohort);
  }

  /** The share of tile t's trip ends before y. */
  private fracAt(t: number, y: number): number {
    const width = this.hi[t] - this.lo[t];
    if (width > 1e-9) return Math.min(1, Math.max(0, (y - this.lo[t]) / width));
    return y >= this.lo[t] ? 1 : 0;
  }
}

/** Weighted walk cost, rider-seconds per day, of the stretch between two served stops. */
export function walkCostS(corridor: Corridor, xi: number, xk: number, { walkSpeedMps, walkWeight }: CostSettings): number {
  return (walkWeight / walkSpeedMps) * corridor.walkBetweenM(xi, xk);
}

/**
 * Cost of the bus serving an intermediate stop at `pos` between served neighbours (rider-seconds per day):
 * p * P(lambda) * riders passing through. `existingIndex` is the stop's index in the corridor, or -1 for a new stop.
 */
export function servedStopCost(
  corridor: Corridor,
  prevM: number,
  pos: number,
  nextM: number,
  existingIndex: number,
  settings: CostSettings,
): ServedStop {
  corridor.catchmentInto(prevM, pos, nextM);
  const endsPerDay = corridor.catchEndsPerDay;
  const throughPerDay = corridor.catchThroughPerDay;
  const trips = corridor.tripsPerDay > 0 ? corridor.tripsPerDay : 1;
  const probability = servedProbability(corridor, endsPerDay, existingIndex, settings);
  const busTimePerTripS = settings.lostTimePerStopS * probability;
  const costS = servingCostS(corridor, busTimePerTripS, throughPerDay, settings);
  return { endsPerDay, throughPerDay, lambdaPerTrip: endsPerDay / trips, probability, costS, busTimePerTripS };
}

/** servedStopCost(...).costS alone, building no object. */
export function servedStopCostS(
  corridor: Corridor,
  prevM: number,
  pos: number,
  nextM: number,
  existingIndex: number,
  settings: CostSettings,
): number {
  corridor.catchmentInto(prevM, pos, nextM);
  return caughtStopCostS(corridor, existingIndex, settings);
}

/** servedStopCostS for the catchment the corridor found last (catchmentInto or sweepTo): the optimiser's inner loop. */
export function caughtStopCostS(corridor: Corridor, existingIndex: number, settings: CostSettings): number {
  const busTimePerTripS = settings.lostTimePerStopS * servedProbability(corridor, corridor.catchEndsPerDay, existingIndex, settings);
  return servingCostS(corridor, busTimePerTripS, corridor.catchThroughPerDay, settings);
}

/** Rider-seconds per day lost to the bus's time at a stop by those riding through, plus operating cost when set. */
function servingCostS(corridor: Corridor, busTimePerTripS: number, throughPerDay: number, settings: CostSettings): number {
  return busTimePerTripS * throughPerDay + (settings.operatingPaxSPerBusS ?? 0) * busTimePerTripS * corridor.tripsPerDay;
}

/** The chance the bus serves a stop with these trip ends per day, by the settings' stopping model. */
function servedProbability(corridor: Corridor, endsPerDay: number, existingIndex: number, settings: CostSettings): number {
  const trips = corridor.tripsPerDay > 0 ? corridor.tripsPerDay : 1;
  let observedShare: number | null = null;
  let baseLambda: number | null = null;
  if (existingIndex >= 0 && settings.observedShare) {
    observedShare = settings.observedShare[existingIndex] ?? null;
    baseLambda = (corridor.boardPerDay[existingIndex] + corridor.alightPerDay[existingIndex]) / trips;
  }
  return stoppingProbability(endsPerDay / trips, settings.stoppingModel, observedShare, baseLambda);
}

/** Total cost (rider-seconds per day, walk + ride delay) of serving the given sorted existing stops. */
export function servedSetCostS(corridor: Corridor, kept: number[], settings: CostSettings): number {
  let total = 0;
  for (let t = 0; t + 1 < kept.length; t++) total += walkCostS(corridor, corridor.posM[kept[t]], corridor.posM[kept[t + 1]], settings);
  for (let t = 1; t + 1 < kept.length; t++) {
    total += servedStopCost(
      corridor,
      corridor.posM[kept[t - 1]],
      corridor.posM[kept[t]],
      corridor.posM[kept[t + 1]],
      kept[t],
      settings,
    ).costS;
  }
  return total;
}
