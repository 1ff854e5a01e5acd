// The demand model behind every figure, checked against things outside the project's own objective:
// an exact enumeration of origin-destination pairs on small corridors (riders passing each served stop,
// the optimiser's objective, each removal's net), the square-root law on a long uniform corridor, and the
// cited mean bus trip length.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { Corridor, servedSetCostS, type CostSettings } from '../../src/model/corridor.js';
import { assumedDemand, NATIONAL_MEAN_TRIP_MI, typicalTripLengthM } from '../../src/model/demand.js';
import { removalEffect } from '../../src/audit/verdicts.js';
import { runAudit } from '../../src/audit/runAudit.js';
import type { PreparedPattern } from '../../src/model/preparePattern.js';
import { handmadeNetwork } from '../helpers/handmade.js';
// @ts-expect-error: a plain ES module of the generators, without type declarations
import { prng as rng } from '../../scripts/lib/seeded.mjs';
import type { ModelParams } from '../../src/model/params.js';

const SPACING = 100;

/**
 * [D] Enumeration, written apart from the corridor: stops every SPACING metres; each stop's catchment
 * (midpoint to midpoint) cut at the stop into two halves, so every midpoint between two served stops
 * (a multiple of SPACING / 2) falls on a cut and each half goes whole to one served stop. Riders from stop
 * i to stop j > i number R * K(x_j - x_i) * len_i * len_j / Z (Z making the total R), spread evenly over
 * the two catchments, so each pair of halves carries its share by length. A half walks from its middle
 * to the served stop it is nearest (exact: no served stop lies inside a half). A served intermediate stop
 * costs p seconds to every rider whose origin half goes to a served stop before it and whose destination
 * half goes to one after it.
 */
function enumerate(n: number, ridersPerDay: number, kernel: (d: number) => number) {
  const x = Array.from({ length: n }, (_, k) => k * SPACING);
  const halves: { stop: number; lo: number; hi: number }[] = [];
  for (let k = 0; k < n; k++) {
    if (k > 0) halves.push({ stop: k, lo: x[k] - SPACING / 2, hi: x[k] });
    if (k < n - 1) halves.push({ stop: k, lo: x[k], hi: x[k] + SPACING / 2 });
  }
  const len = x.map((_, k) => (k === 0 || k === n - 1 ? SPACING / 2 : SPACING));
  let Z = 0;
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) Z += kernel(x[j] - x[i]) * len[i] * len[j];
  const pairs: { a: number; b: number; riders: number }[] = [];
  halves.forEach((ha, a) =>
    halves.forEach((hb, b) => {
      if (hb.stop <= ha.stop) return;
      const riders = (ridersPerDay * kernel(x[hb.stop] - x[ha.stop]) * (ha.hi - ha.lo) * (hb.hi - hb.lo)) / Z;
      pairs.push({ a, b, riders });
    }),
  );
  /** Each half's served stop (an index into x) and walk, for a served set. */
  const assign = (served: number[]) =>
    halves.map((h) => {
      const mid = (h.lo + h.hi) / 2;
      let best = served[0];
      for (const s of served) if (Math.abs(x[s] - mid) < Math.abs(x[best] - mid)) best = s;
      return { to: best, walkM: Math.abs(x[best] - mid) };
    });
  const through = (served: number[]): Map<number, number> => {
    const at = assign(served);
    const out = new Map<number, number>(served.slice(1, -1).map((s) => [s, 0]));
    for (const { a, b, riders } of pairs) for (const s of out.keys()) if (at[a].to < s && at[b].to > s) out.set(s, out.get(s)! + riders);
    return out;
  };
  const cost = (served: number[], s: CostSettings): number => {
    const at = assign(served);
    let walkM = 0;
    for (const { a, b, riders } of pairs) walkM += riders * (at[a].walkM + at[b].walkM);
    let ride = 0;
    for (const v of through(served).values()) ride += s.lostTimePerStopS * v;
    return (s.walkWeight / s.walkSpeedMps) * walkM + ride;
  };
  return { x, through, cost };
}

const always: CostSettings = { walkSpeedMps: 1.2, walkWeight: 2, lostTimePerStopS: 20, stoppingModel: 'always' };

function randomServed(n: number, rand: () => number): number[] {
  const served = [0];
  for (let k = 1; k < n - 1; k++) if (rand() < 0.5) served.push(k);
  served.push(n - 1);
  return served;
}

describe('riders passing a stop, the objective and removals against an exact enumeration of pairs', () => {
  for (const [label, meanTripM] of [
    ['uniform pairs', 1e9],
    ['exponential trip lengths', 350],
  ] as const) {
    it(`${label}, corridors of 3 to 12 stops`, () => {
      const rand = rng(20261203);
      for (let trial = 0; trial < 40; trial++) {
        const n = 3 + (trial % 10);
        const trips = 50;
        const posM = Array.from({ length: n }, (_, k) => k * SPACING);
        const d = assumedDemand('e', posM, trips, { boardingsPerTripKm: 40, meanTripM });
        const decay = d.pairs!.decayM;
        if (meanTripM > 1e6) expect(decay).toBe(Infinity);
        const kernel = (dist: number) => (Number.isFinite(decay) ? Math.exp(-dist / decay) : 1);
        const e = enumerate(n, d.ridersPerDay, kernel);
        const c = new Corridor({ posM, boardPerDay: d.boardPerDay, alightPerDay: d.alightPerDay, tripsPerDay: trips });
        // riders passing each served stop, for random served sets (catchments over several of today's stops):
        // the corridor sees boardings and alightings alone and takes riders on board to be alike, which is
        // exact for trip lengths without memory
        const served = randomServed(n, rand);
        for (const [s, want] of e.through(served)) {
          const t = served.indexOf(s);
          expect(c.catchment(posM[served[t - 1]], posM[s], posM[served[t + 1]]).throughPerDay).toBeCloseTo(want, 6);
        }
        // the optimiser's objective, for the same set
        expect(servedSetCostS(c, served, always)).toBeCloseTo(e.cost(served, always), 4);
        // each removal's net: the change in the enumerated cost with every other stop served
        const all = [...Array(n).keys()];
        const prep = { corridor: c } as unknown as PreparedPattern;
        for (let m = 1; m < n - 1; m++) {
          const want =
            (e.cost(
              all.filter((k) => k !== m),
              always,
            ) -
              e.cost(all, always)) /
            60;
          expect(removalEffect(prep, m, always).netPaxMinPerDay).toBeCloseTo(want, 6);
        }
      }
    });
  }

  it('a stop served between its own neighbours passes those on board less those alighting', () => {
    const posM = [0, 100, 200, 300, 400];
    const c = new Corridor({ posM, boardPerDay: [40, 30, 20, 10, 0], alightPerDay: [0, 10, 20, 30, 40], tripsPerDay: 10 });
    // on board arriving at stop 2: 40 + 30 - 10 = 60; 20 alight there
    expect(c.catchment(100, 200, 300).throughPerDay).toBeCloseTo(40, 9);
    // [D] a catchment from 100 m to 300 m (stops 1 and 3 not served): tiles 50-150, 150-250, 250-350 hold
    // stops 1, 2, 3. On board at 100 m: 40 + 15 boarded - 5 alighted = 50. Riders on board taken alike:
    // half of tile 1: 5 alight, 50 * (1 - 5/50) = 45 of them left, 45 + 15 boarding = 60 on board;
    // tile 2: 20 alight, 45 * (1 - 20/60) = 30 left, 40 + 20 = 60 on board; half of tile 3: 15 alight,
    // 30 * (1 - 15/60) = 22.5 pass. (Subtracting every alighting inside from those on board at 100 m,
    // 50 - 5 - 20 - 15 = 10, would count riders boarding and alighting inside as passing riders lost.)
    expect(c.catchment(0, 200, 400).throughPerDay).toBeCloseTo(22.5, 9);
  });
});

describe('the square-root law on a long uniform corridor', () => {
  it('12 km, stops every 100 m, mean trip 3 km: the reported optimum and the optimiser agree with sqrt(2 v p L / w)', () => {
    const distM = Array.from({ length: 121 }, (_, k) => k * 100);
    const { feed, patterns } = handmadeNetwork({ distM, tripsPerDay: 100, sharedAt: 60 });
    const r = runAudit(feed, patterns, {
      params: { mean_trip_length_m: 3000, cruise_speed_mps: 11.176, stopping_model: 'always' },
      generatedAt: '2026-10-14T00:00:00Z',
    });
    const p = r.patterns.find((x) => x.patternId === 'V1:0:1')!;
    expect(p.meanTripLengthM).toBeCloseTo(3000, 0);
    // [C] the square-root law (uniform demand, every stop served): s* = sqrt(2 v p L / w), v walk speed,
    // p lost time per stop, L mean trip, w walk weight (per rider: w (s/2) / v walking, p L / s riding)
    const star = Math.sqrt((2 * 1.2 * p.lostTimePerStopS * 3000) / 2);
    expect(Math.abs(p.optimalSpacingM / star - 1)).toBeLessThan(0.05);
    const keptSpacing = 12000 / (p.optimalStopCount - 1);
    expect(Math.abs(keptSpacing / star - 1)).toBeLessThan(0.1);
    expect(r.warnings.find((w) => w.code === 'pattern-short-for-trip')?.examples.some((x) => x.startsWith('V1:'))).not.toBe(true);
  });

  it('a pattern too short for the mean asked for holds what fits and says so, counted', () => {
    const { feed, patterns } = handmadeNetwork({ distM: Array.from({ length: 31 }, (_, k) => k * 100) });
    const r = runAudit(feed, patterns, {
      params: { mean_trip_length_m: 3000, stopping_model: 'always' },
      generatedAt: '2026-10-14T00:00:00Z',
    });
    const w = r.warnings.find((x) => x.code === 'pattern-short-for-trip');
    expect(w?.count).toBe(2);
    const p = r.patterns.find((x) => x.patternId === 'V1:0:1')!;
    expect(p.meanTripLengthM).toBeGreaterThan(900);
    expect(p.meanTripLengthM).toBeLessThan(1100); // about a third of 3 km
  });

  it('the optimum no longer grows with the route: 10 km and 20 km patterns with a 3 km mean trip get the same', () => {
    const at = (km: number) => {
      const { feed, patterns } = handmadeNetwork({ distM: Array.from({ length: km * 10 + 1 }, (_, k) => k * 100), sharedAt: 3 });
      return runAudit(feed, patterns, {
        params: { mean_trip_length_m: 3000, cruise_speed_mps: 11.176, stopping_model: 'always' },
      }).patterns.find((x) => x.patternId === 'V1:0:1')!;
    };
    expect(at(20).optimalSpacingM / at(10).optimalSpacingM).toBeCloseTo(1, 3);
  });
});

describe('assumed demand where stops are far apart for the trips asked', () => {
  it('keeps every rider: the shortest trips the pattern holds, never none or infinitely many', () => {
    for (const [posM, meanTripM] of [
      [[0, 44_215], 39_000],
      [[0, 5000, 12_000], 3000],
      [[0, 50, 30_000, 30_050], 200],
    ] as const) {
      const d = assumedDemand('far', [...posM], 10, { boardingsPerTripKm: 3, catchmentHalfMaxM: 400, meanTripM });
      const D = posM[posM.length - 1] - posM[0];
      expect(d.ridersPerDay).toBeCloseTo(3 * (D / 1000) * 10, 6);
      expect(Number.isFinite(d.meanTripLengthM)).toBe(true);
      expect(d.meanTripLengthM).toBeGreaterThan(0);
      for (const x of [...d.boardPerDay, ...d.alightPerDay]) expect(Number.isFinite(x) && x >= 0).toBe(true);
    }
  });
});

describe('a ridership file and mean_trip_length_m', () => {
  it('takes trip lengths from the counts, says the parameter was not used, and keeps the optimum to the load profile', () => {
    const distM = Array.from({ length: 21 }, (_, k) => k * 150);
    const { feed, patterns } = handmadeNetwork({ distM, tripsPerDay: 40, sharedAt: 10 });
    const dir = mkdtempSync(join(tmpdir(), 'stopspan-trips-'));
    try {
      const file = join(dir, 'ridership.csv');
      // every rider of V1 boards at the first stop and alights at the last: a mean trip of 3 km
      const rows = ['stop_id,route_id,boardings,alightings', 'v1-0,V1,400,0', 'v1-20,V1,0,400'];
      for (let k = 1; k < 20; k++) rows.push(`v1-${k},V1,0,0`);
      writeFileSync(file, rows.join('\n') + '\n');
      const params: Partial<ModelParams> = { mean_trip_length_m: 500, stopping_model: 'always', cruise_speed_mps: 11.176 };
      const r = runAudit(feed, patterns, { params, ridership: file, generatedAt: '2026-10-14T00:00:00Z' });
      const p = r.patterns.find((x) => x.patternId === 'V1:0:1')!;
      expect(p.meanTripLengthM).toBeCloseTo(3000, 6);
      expect(r.warnings.find((w) => w.code === 'mean-trip-from-counts')?.count).toBe(1);
      // [C] the square-root law with the load profile's mean trip, every stop served
      expect(p.optimalSpacingM).toBeCloseTo(Math.sqrt((2 * 1.2 * p.lostTimePerStopS * 3000) / 2), 6);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('the typical bus trip', () => {
  it('is about 2 miles on city buses, below the national motor-bus mean that suburban services lift', () => {
    // [M] city local buses: passenger-miles over unlinked trips about 1.8-2.5 mi (from memory)
    expect(typicalTripLengthM(3) / 1609.344).toBeGreaterThanOrEqual(1.8);
    expect(typicalTripLengthM(3) / 1609.344).toBeLessThanOrEqual(2.5);
    // [S] passenger-miles 19 883 million (2011, motor bus), US BTS National Transportation Statistics
    // table 1-40 as quoted in BTS "Passenger Travel" table 2-1; [M] unlinked bus trips about 5 250 million
    // that year (APTA Public Transportation Fact Book, from memory): 3.79 mi
    expect(NATIONAL_MEAN_TRIP_MI.bus).toBeCloseTo(3.79, 2);
    expect(typicalTripLengthM(3) / 1609.344).toBeLessThan(NATIONAL_MEAN_TRIP_MI.bus);
    // other modes keep the national figure: heavy rail 17 317 / 3 700 [S]+[M]
    expect(typicalTripLengthM(1) / 1609.344).toBeCloseTo(17_317 / 3_700, 6);
  });
});
