// The optimiser's sweep of catchments (Corridor.sweepFrom/sweepTo) and its forward dynamic programme give
// exactly what a catchment asked afresh and the backward recurrence give, bit for bit, on seeded corridors
// with coincident, metre-spaced and long-gap stops; several walk weights optimised in one run keep what
// each keeps alone, sweeping the stops once; and a pattern of thousands of stops a few metres apart is
// optimised in time linear in its stops.
import { describe, expect, it } from 'vitest';
import { Corridor, servedStopCostS, walkCostS, type CostSettings } from '../../src/model/corridor.js';
import { assumedDemand } from '../../src/model/demand.js';
import { MAX_WINDOW_STOPS, optimiseStops, optimiseStopsAt } from '../../src/model/optimiser.js';
// @ts-expect-error: a plain ES module of the generators, without type declarations
import { prng } from '../../scripts/lib/seeded.mjs';
import { growthRatio } from '../helpers/growth.js';

const SEED = process.env.STOPSPAN_FUZZ_SEED !== undefined ? Number(process.env.STOPSPAN_FUZZ_SEED) : 20261203;
console.log(`test/model/sweep.test.ts: seed ${SEED} (replay with STOPSPAN_FUZZ_SEED=${SEED})`);

/** Positions mixing coincident stops, stops a metre or a few apart, ordinary gaps and long ones. */
function positions(rand: () => number, n: number): number[] {
  const pos = [0];
  for (let j = 1; j < n; j++) {
    const u = rand();
    const gap = u < 0.2 ? 0 : u < 0.4 ? rand() * 3 : u < 0.9 ? 100 + rand() * 400 : 900 + rand() * 3000;
    pos.push(pos[j - 1] + gap);
  }
  return pos;
}

function corridorOf(rand: () => number, n: number): Corridor {
  const posM = positions(rand, n);
  const demand = assumedDemand('P', posM, 60, { boardingsPerTripKm: 2 + rand() * 4, catchmentHalfMaxM: 400 });
  return new Corridor({
    posM,
    boardPerDay: demand.boardPerDay,
    alightPerDay: demand.alightPerDay,
    tripsPerDay: 60,
    catchmentHalfMaxM: 400,
  });
}

/** The backward form of the optimiser's recurrence, G(i,k) = W(i,k) + min_h [G(h,i) + S(h,i,k)], each catchment afresh. */
function backwardOptimum(c: Corridor, s: CostSettings, maxGapM: number, forced: boolean[]): { kept: number[]; costS: number } {
  const n = c.n;
  const pos = c.posM;
  const preds: number[][] = [[]];
  for (let k = 1; k < n; k++) {
    const p: number[] = [];
    for (let i = k - 1; i >= 0; i--) {
      if (i < k - 1 && (pos[k] - pos[i] > maxGapM || k - i > MAX_WINDOW_STOPS)) break;
      p.push(i);
      if (i === 0 || forced[i]) break;
    }
    preds.push(p);
  }
  const G: number[][] = preds.map((p) => p.map(() => Infinity));
  const back: number[][] = preds.map((p) => p.map(() => -1));
  for (let k = 1; k < n; k++) {
    preds[k].forEach((i, e) => {
      const w = walkCostS(c, pos[i], pos[k], s);
      if (i === 0) return void (G[k][e] = w);
      let best = Infinity;
      let arg = -1;
      preds[i].forEach((h, f) => {
        if (!(G[i][f] < Infinity)) return;
        const v = G[i][f] + servedStopCostS(c, pos[h], pos[i], pos[k], i, s);
        if (v < best) ((best = v), (arg = f));
      });
      if (arg >= 0) ((G[k][e] = best + w), (back[k][e] = arg));
    });
  }
  const last = n - 1;
  let t = G[last].reduce((b, g, e) => (g < G[last][b] ? e : b), 0);
  const costS = G[last][t];
  const kept = [last];
  for (let k = last; k > 0;) {
    const i = preds[k][t];
    kept.push(i);
    t = back[k][t];
    k = i;
  }
  return { kept: kept.reverse(), costS };
}

describe('catchment sweep', () => {
  it(`answers as catchmentInto does, bit for bit (seed ${SEED})`, () => {
    const rand = prng(SEED);
    let asked = 0;
    for (let run = 0; run < 30; run++) {
      const c = corridorOf(rand, 3 + Math.floor(rand() * 60));
      for (let h = 0; h + 1 < c.n; h++) {
        for (let i = h + 1; i + 1 < c.n; i++) {
          c.sweepFrom(c.posM[h], c.posM[i]);
          for (let k = i + 1; k < c.n; k++) {
            c.sweepTo(c.posM[i], c.posM[k]);
            const ends = c.catchEndsPerDay;
            const through = c.catchThroughPerDay;
            c.catchmentInto(c.posM[h], c.posM[i], c.posM[k]);
            expect([ends, through]).toEqual([c.catchEndsPerDay, c.catchThroughPerDay]);
            asked++;
          }
        }
      }
    }
    expect(asked).toBeGreaterThan(10_000);
  });
});

describe('forward optimiser', () => {
  it(`keeps the stops, at the cost, of the backward recurrence (seed ${SEED + 1})`, () => {
    const rand = prng(SEED + 1);
    const models = ['always', 'poisson'] as const;
    for (let run = 0; run < 40; run++) {
      const c = corridorOf(rand, 2 + Math.floor(rand() * 120));
      const s: CostSettings = {
        walkSpeedMps: 1.3,
        walkWeight: 1 + rand() * 2,
        lostTimePerStopS: 10 + rand() * 30,
        stoppingModel: models[run % 2],
      };
      const forced = Array.from({ length: c.n }, () => rand() < 0.05);
      const maxGapM = rand() < 0.3 ? Infinity : 400 + rand() * 800;
      const got = optimiseStops(c, s, { forced, maxGapM });
      const want = backwardOptimum(c, s, maxGapM, forced);
      expect({ kept: got.kept, costS: got.costS }).toEqual(want);
    }
  });

  it(`optimises several walk weights in one run as each alone, sweeping the stops once (seed ${SEED + 2})`, () => {
    const rand = prng(SEED + 2);
    const models = ['always', 'poisson'] as const;
    for (let run = 0; run < 30; run++) {
      const c = corridorOf(rand, 2 + Math.floor(rand() * 120));
      const base = {
        walkSpeedMps: 1.3,
        lostTimePerStopS: 10 + rand() * 30,
        stoppingModel: models[run % 2],
        operatingPaxSPerBusS: run % 3 === 0 ? rand() * 2 : 0,
      };
      // the audit's own weight and its sensitivity cases' 1.5 and 2.5
      const settings: CostSettings[] = [2, 1.5, 2.5].map((walkWeight) => ({ ...base, walkWeight }));
      const forced = Array.from({ length: c.n }, () => rand() < 0.05);
      const maxGapM = rand() < 0.3 ? Infinity : 400 + rand() * 800;
      const sweeps = (f: () => void): number => {
        const from = c.sweepFrom.bind(c);
        let count = 0;
        c.sweepFrom = (a: number, b: number) => (count++, from(a, b));
        try {
          f();
        } finally {
          c.sweepFrom = from;
        }
        return count;
      };
      let together: ReturnType<typeof optimiseStopsAt> = [];
      const once = sweeps(() => (together = optimiseStopsAt(c, settings, { forced, maxGapM })));
      let alone = 0;
      settings.forEach((s, q) => {
        let own!: ReturnType<typeof optimiseStops>;
        alone += sweeps(() => (own = optimiseStops(c, s, { forced, maxGapM })));
        expect(together[q]).toEqual(own);
        if (q === 0) expect({ kept: own.kept, costS: own.costS }).toEqual(backwardOptimum(c, s, maxGapM, forced));
      });
      expect(once * settings.length).toBe(alone);
    }
  });

  it('optimises stops a few metres apart in time linear in their number', () => {
    // the window is MAX_WINDOW_STOPS stops whatever the spacing; asked afresh, each catchment spanned up to
    // a window of tiles and the work grew with its cube (5 000 stops 5 m apart: seconds a walk weight)
    const make = (n: number) => {
      const posM = Array.from({ length: n }, (_, j) => j * 5);
      const d = assumedDemand('P', posM, 60, { boardingsPerTripKm: 4, catchmentHalfMaxM: 400 });
      return new Corridor({ posM, boardPerDay: d.boardPerDay, alightPerDay: d.alightPerDay, tripsPerDay: 60, catchmentHalfMaxM: 400 });
    };
    const s: CostSettings = { walkSpeedMps: 1.3, walkWeight: 2, lostTimePerStopS: 20, stoppingModel: 'poisson' };
    const optimise = (n: number) => {
      const c = make(n);
      return () => optimiseStops(c, s, { maxGapM: 800 });
    };
    // 8 000 stops against eight runs of 1 000: near 1 when linear, 8 when quadratic, 64 with the cube
    const { ratio, text } = growthRatio(optimise(1_000), optimise(8_000), 8);
    expect(ratio, text).toBeLessThan(4);
  });
});
