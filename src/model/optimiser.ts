// The per-pattern optimiser: which existing stops to keep so that riders' walk plus ride delay is least,
// a dynamic programme over consecutive kept stops (the approach of Furth & Rahbee 2000). Terminals and
// forced stops (timepoints, transfers, a keep-list) stay; no kept gap may exceed the maximum-gap policy
// unless it is a gap between consecutive stops already. Because a stop's chance of being served depends
// on both kept neighbours (its catchment), the state is the last two kept stops:
//   G(i,k) = W(i,k) + min_h [G(h,i) + S(h,i,k)],
// which is F(k) = min_i F(i) + W(i,k) + S(k) with S made exact. The window of i is bounded twice: by the
// max gap, and by count (MAX_WINDOW_STOPS predecessors), so the cost is O(n * window^2) with the window at
// most that count whatever the spacing. Without the count bound, stops at one point or a metre apart made
// the window the whole trip and the audit cubic in a trip's stops (2 000 such stops: minutes).

import { type Corridor, type CostSettings, caughtStopCostS, walkCostS } from './corridor.js';

/**
 * The most stops a kept gap may skip over, less one: a kept stop's predecessor is at most this many stops
 * back. It binds only where more than this many stops lie within the max gap (with the 800 m policy, stops
 * closer than 25 m on average over the whole stretch): there the optimiser keeps at least one stop in
 * every run of this many, a gap no real pattern's optimum comes near (on the real feeds of the tests the
 * kept stops are the same with and without it).
 */
export const MAX_WINDOW_STOPS = 32;

export interface OptimiseOptions {
  forced?: boolean[]; // per stop: must be kept (terminals are always kept)
  maxGapM?: number; // Infinity for none
  /** At most this many predecessors per kept stop (default MAX_WINDOW_STOPS). */
  maxWindowStops?: number;
}

export interface OptimiseResult {
  kept: number[]; // indices of kept stops, ascending, first and last included
  costS: number; // rider-seconds per day at the optimum
  optimalStopCount: number;
}

export function optimiseStops(corridor: Corridor, settings: CostSettings, options: OptimiseOptions = {}): OptimiseResult {
  return optimiseStopsAt(corridor, [settings], options)[0];
}

/**
 * optimiseStops for several cost settings at once (the walk weights of the sensitivity cases): what a
 * served stop costs does not depend on the weight on walking, so each stop's catchments are swept once
 * and offered to every setting's programme, instead of once per setting. Each result is bit for bit
 * that of optimiseStops alone: the same offers in the same order, the same arithmetic.
 */
export function optimiseStopsAt(
  corridor: Corridor,
  settingsList: readonly CostSettings[],
  { forced = [], maxGapM = Infinity, maxWindowStops = MAX_WINDOW_STOPS }: OptimiseOptions = {},
): OptimiseResult[] {
  const n = corridor.n;
  const m = settingsList.length;
  if (!(maxGapM > 0)) throw new RangeError(`optimiseStops: maxGapM must be above 0, got ${maxGapM}`);
  if (!(maxWindowStops >= 1)) throw new RangeError(`optimiseStops: maxWindowStops must be 1 or more, got ${maxWindowStops}`);
  if (m === 0) return [];
  const pos = corridor.posM;
  const isForced = (j: number) => j === 0 || j === n - 1 || forced[j] === true;

  // allowed predecessors of each stop, nearest first: those of stop k are preds[predAt[k] .. predAt[k + 1]),
  // all stops' in one array (one allocation per call, not three per stop: the optimiser runs for every
  // pattern and walk weight, and its small arrays were 12 MB of garbage per Manhattan audit)
  const predAt = new Int32Array(n + 1);
  let preds = new Int32Array(Math.max(16, n * 4));
  let used = 0;
  for (let k = 1; k < n; k++) {
    predAt[k] = used;
    for (let i = k - 1; i >= 0; i--) {
      if (i < k - 1 && (pos[k] - pos[i] > maxGapM || k - i > maxWindowStops)) break;
      if (used === preds.length) {
        const grown = new Int32Array(preds.length * 2);
        grown.set(preds);
        preds = grown;
      }
      preds[used++] = i;
      if (isForced(i)) break; // cannot skip over a forced stop
    }
  }
  predAt[n] = used;

  // G[predAt[k] + t] is the best cost with the last two kept stops preds[predAt[k] + t] and k; back holds
  // the t of the best choice among the predecessors of that predecessor. Worked forwards: once the edges
  // into stop i are final, each of them (h, i) offers itself to every edge (i, k) out of i, k rising, so
  // the riders of stop i between h and k are one sweep over k (Corridor.sweepTo) rather than a catchment
  // afresh for each k. Every edge (i, k) hears its offers in the order of i's predecessors, nearest
  // first, and takes only a strictly better one: the choice of the backward form min_h, tie for tie.
  // One G, back and best per setting; the sweep and the stop's cost are shared by all of them.
  const Gs = settingsList.map(() => new Float64Array(used).fill(Infinity));
  const backs = settingsList.map(() => new Int32Array(used).fill(-1));
  const bests = settingsList.map(() => new Float64Array(used).fill(Infinity));
  for (let i = 1; i < n; i++) {
    // the edges into i are final: their cost is the best offer plus the walk between the two stops
    for (let e = predAt[i]; e < predAt[i + 1]; e++) {
      const h = preds[e];
      for (let q = 0; q < m; q++) {
        const w = walkCostS(corridor, pos[h], pos[i], settingsList[q]);
        if (h === 0) Gs[q][e] = w;
        else if (backs[q][e] >= 0) Gs[q][e] = bests[q][e] + w;
      }
    }
    if (i === n - 1) break;
    for (let f = predAt[i]; f < predAt[i + 1]; f++) {
      let open = false;
      for (let q = 0; q < m; q++) if (Gs[q][f] < Infinity) open = true;
      if (!open) continue;
      corridor.sweepFrom(pos[preds[f]], pos[i]);
      // the edges (i, k) out of i: i is the predecessor k - 1 - i places back, while k's window reaches it
      for (let k = i + 1; k < n; k++) {
        const e = predAt[k] + (k - 1 - i);
        if (e >= predAt[k + 1]) break;
        corridor.sweepTo(pos[i], pos[k]);
        for (let q = 0; q < m; q++) {
          const G = Gs[q];
          if (!(G[f] < Infinity)) continue;
          const c = G[f] + caughtStopCostS(corridor, i, settingsList[q]);
          if (c < bests[q][e]) {
            bests[q][e] = c;
            backs[q][e] = f - predAt[i];
          }
        }
      }
    }
  }
  return Gs.map((G, q) => keptStops(n, preds, predAt, G, backs[q]));
}

/** The kept stops of the best programme ending at the last stop, traced back through `back`. */
function keptStops(n: number, preds: Int32Array, predAt: Int32Array, G: Float64Array, back: Int32Array): OptimiseResult {
  const last = n - 1;
  let bestT = -1;
  let bestCost = Infinity;
  for (let t = 0; t < predAt[last + 1] - predAt[last]; t++) {
    if (G[predAt[last] + t] < bestCost) {
      bestCost = G[predAt[last] + t];
      bestT = t;
    }
  }
  if (bestT < 0) throw new Error('optimiseStops: no feasible set of stops (consecutive stops are always allowed, so this is a bug)');
  const kept: number[] = [last];
  let k = last;
  let t = bestT;
  while (k > 0) {
    const i = preds[predAt[k] + t];
    kept.push(i);
    if (i === 0) break;
    t = back[predAt[k] + t];
    k = i;
  }
  kept.reverse();
  return { kept, costS: bestCost, optimalStopCount: kept.length };
}
