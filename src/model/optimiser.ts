// The per-pattern optimiser: which existing stops to keep so that riders' walk plus ride delay is least,
// a dynamic programme over consecutive kept stops (the approach of Furth & Rahbee 2000). Terminals and
// forced stops (timepoints, transfers, a keep-list) stay; no kept gap may exceed the maximum-gap policy
// unless it is a gap between consecutive stops already. Because a stop's chance of being served depends
// on both kept neighbours (its catchment), the state is the last two kept stops:
//   G(i,k) = W(i,k) + min_h [G(h,i) + S(h,i,k)],
// which is F(k) = min_i F(i) + W(i,k) + S(k) with S made exact. The max gap bounds the window of i, so
// the cost is O(n * window^2), not O(n^3).

import { type Corridor, type CostSettings, servedStopCostS, walkCostS } from './corridor.js';

export interface OptimiseOptions {
  forced?: boolean[]; // per stop: must be kept (terminals are always kept)
  maxGapM?: number; // Infinity for none
}

export interface OptimiseResult {
  kept: number[]; // indices of kept stops, ascending, first and last included
  costS: number; // rider-seconds per day at the optimum
  optimalStopCount: number;
}

export function optimiseStops(corridor: Corridor, settings: CostSettings, { forced = [], maxGapM = Infinity }: OptimiseOptions = {}): OptimiseResult {
  const n = corridor.n;
  if (!(maxGapM > 0)) throw new RangeError(`optimiseStops: maxGapM must be above 0, got ${maxGapM}`);
  const pos = corridor.posM;
  const isForced = (j: number) => j === 0 || j === n - 1 || forced[j] === true;

  // allowed predecessors of each stop, nearest first
  const preds: number[][] = new Array(n);
  preds[0] = [];
  for (let k = 1; k < n; k++) {
    const list: number[] = [];
    for (let i = k - 1; i >= 0; i--) {
      if (i < k - 1 && pos[k] - pos[i] > maxGapM) break;
      list.push(i);
      if (isForced(i)) break; // cannot skip over a forced stop
    }
    preds[k] = list;
  }

  // G[k][t] is the best cost with the last two kept stops preds[k][t] and k; back[k][t] indexes preds[i]
  const G: Float64Array[] = new Array(n);
  const back: Int32Array[] = new Array(n);
  const walkCost = (i: number, k: number): number => walkCostS(corridor, pos[i], pos[k], settings);
  G[0] = new Float64Array(0);
  back[0] = new Int32Array(0);
  for (let k = 1; k < n; k++) {
    const pk = preds[k];
    const gk = new Float64Array(pk.length).fill(Infinity);
    const bk = new Int32Array(pk.length).fill(-1);
    for (let t = 0; t < pk.length; t++) {
      const i = pk[t];
      const w = walkCost(i, k);
      if (i === 0) {
        gk[t] = w;
        continue;
      }
      const pi = preds[i];
      const gi = G[i];
      let best = Infinity;
      let arg = -1;
      for (let u = 0; u < pi.length; u++) {
        if (!(gi[u] < Infinity)) continue;
        const c = gi[u] + servedStopCostS(corridor, pos[pi[u]], pos[i], pos[k], i, settings);
        if (c < best) {
          best = c;
          arg = u;
        }
      }
      if (arg >= 0) {
        gk[t] = best + w;
        bk[t] = arg;
      }
    }
    G[k] = gk;
    back[k] = bk;
  }

  const last = n - 1;
  let bestT = -1;
  let bestCost = Infinity;
  for (let t = 0; t < preds[last].length; t++) {
    if (G[last][t] < bestCost) {
      bestCost = G[last][t];
      bestT = t;
    }
  }
  if (bestT < 0) throw new Error('optimiseStops: no feasible set of stops (consecutive stops are always allowed, so this is a bug)');
  const kept: number[] = [last];
  let k = last;
  let t = bestT;
  while (k > 0) {
    const i = preds[k][t];
    kept.push(i);
    if (i === 0) break;
    t = back[k][t];
    k = i;
  }
  kept.reverse();
  return { kept, costS: bestCost, optimalStopCount: kept.length };
}
