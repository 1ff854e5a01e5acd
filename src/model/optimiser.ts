// The per-pattern optimiser: which existing stops to keep so that riders' walk plus ride delay is least,
// a dynamic programme over consecutive kept stops (the approach of Furth & Rahbee 2000). Terminals and
// forced stops (timepoints, transfers, a keep-list) stay; no kept gap may exceed the maximum-gap policy
// unless it is a gap between consecutive stops already. Because a stop's chance of being served depends
// on both kept neighbours (its catchment), the state is the last two kept stops:
//   G(i,k) = W(i,k) + min_h [G(h,i) + S(h,i,k)],
// which is F(k) = min_i F(i) + W(i,k) + S(k) with S made exact. The max gap bounds the window of i, so
// the cost is O(n * window^2), not O(n^3).
// Only the walk terms W depend on the walk weight. Given a cache, the first run keeps the unweighted walk
// metres and the served-stop costs S it computed, and runs at other walk weights reuse them.

import { type Corridor, type CostSettings, servedStopCostS } from './corridor.js';

export interface OptimiseOptions {
  forced?: boolean[]; // per stop: must be kept (terminals are always kept)
  maxGapM?: number; // Infinity for none
  /**
   * Filled by the first run and reused by later ones, which must differ from it in the walk weight only
   * (same corridor, forced stops, maximum gap and other settings; checked). Left empty when the tables would
   * hold more than MAX_CACHED_TERMS served-stop costs.
   */
  cache?: OptimiserCache;
}

/** What runs of the optimiser at different walk weights share: see OptimiseOptions.cache. */
export interface OptimiserCache {
  tables?: OptimiserTables;
}

interface OptimiserTables {
  key: { corridor: Corridor; forced: boolean[]; maxGapM: number; walkSpeedMps: number; lostTimePerStopS: number; stoppingModel: string; observedShare: unknown; operatingPaxSPerBusS: number };
  walkM: Float64Array[]; // [k][t]: metres walked per day between preds[k][t] and k
  servedS: Float64Array[]; // [k][offset[k][t] + u]: S(preds[i][u], i, k) with i = preds[k][t]
  offset: Int32Array[];
}

/** Largest number of served-stop costs kept in a cache (8 bytes each). */
export const MAX_CACHED_TERMS = 4_000_000;

function sameKey(a: OptimiserTables['key'], b: OptimiserTables['key']): boolean {
  if (a.corridor !== b.corridor || a.maxGapM !== b.maxGapM || a.walkSpeedMps !== b.walkSpeedMps || a.lostTimePerStopS !== b.lostTimePerStopS) return false;
  if (a.stoppingModel !== b.stoppingModel || a.observedShare !== b.observedShare || a.operatingPaxSPerBusS !== b.operatingPaxSPerBusS) return false;
  const n = a.corridor.n;
  for (let j = 0; j < n; j++) if ((a.forced[j] === true) !== (b.forced[j] === true)) return false;
  return true;
}

export interface OptimiseResult {
  kept: number[]; // indices of kept stops, ascending, first and last included
  costS: number; // rider-seconds per day at the optimum
  optimalStopCount: number;
}

export function optimiseStops(corridor: Corridor, settings: CostSettings, { forced = [], maxGapM = Infinity, cache }: OptimiseOptions = {}): OptimiseResult {
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

  const key = { corridor, forced, maxGapM, walkSpeedMps: settings.walkSpeedMps, lostTimePerStopS: settings.lostTimePerStopS, stoppingModel: settings.stoppingModel, observedShare: settings.observedShare, operatingPaxSPerBusS: settings.operatingPaxSPerBusS ?? 0 };
  let tables = cache?.tables;
  if (tables && !sameKey(tables.key, key)) throw new RangeError('optimiseStops: the cache was filled for another corridor or other settings than the walk weight');
  if (!tables && cache) {
    let terms = 0;
    for (let k = 1; k < n; k++) for (const i of preds[k]) terms += preds[i].length;
    if (terms <= MAX_CACHED_TERMS) {
      tables = { key, walkM: new Array(n), servedS: new Array(n), offset: new Array(n) };
      tables.walkM[0] = new Float64Array(0);
      tables.servedS[0] = new Float64Array(0);
      tables.offset[0] = new Int32Array(0);
      for (let k = 1; k < n; k++) {
        const pk = preds[k];
        const wk = new Float64Array(pk.length);
        const ok = new Int32Array(pk.length);
        let size = 0;
        for (let t = 0; t < pk.length; t++) {
          wk[t] = corridor.walkBetweenM(pos[pk[t]], pos[k]);
          ok[t] = size;
          if (pk[t] > 0) size += preds[pk[t]].length;
        }
        const sk = new Float64Array(size);
        for (let t = 0; t < pk.length; t++) {
          const i = pk[t];
          if (i === 0) continue;
          const pi = preds[i];
          for (let u = 0; u < pi.length; u++) sk[ok[t] + u] = servedStopCostS(corridor, pos[pi[u]], pos[i], pos[k], i, settings);
        }
        tables.walkM[k] = wk;
        tables.servedS[k] = sk;
        tables.offset[k] = ok;
      }
      cache.tables = tables;
    }
  }

  // G[k][t] is the best cost with the last two kept stops preds[k][t] and k; back[k][t] indexes preds[i]
  const G: Float64Array[] = new Array(n);
  const back: Int32Array[] = new Array(n);
  // as walkCostS weighs the metres walked
  const walkPerM = settings.walkWeight / settings.walkSpeedMps;
  G[0] = new Float64Array(0);
  back[0] = new Int32Array(0);
  for (let k = 1; k < n; k++) {
    const pk = preds[k];
    const gk = new Float64Array(pk.length).fill(Infinity);
    const bk = new Int32Array(pk.length).fill(-1);
    const wk = tables?.walkM[k];
    const sk = tables?.servedS[k];
    const ok = tables?.offset[k];
    for (let t = 0; t < pk.length; t++) {
      const i = pk[t];
      const w = walkPerM * (wk ? wk[t] : corridor.walkBetweenM(pos[i], pos[k]));
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
        const c = gi[u] + (sk && ok ? sk[ok[t] + u] : servedStopCostS(corridor, pos[pi[u]], pos[i], pos[k], i, settings));
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
