// The corridor cost behind removals and additions, against the closed forms of the design notes.
import { describe, expect, it } from 'vitest';
import { Corridor, servedSetCostS, servedStopCost, type CostSettings } from '../../src/model/corridor.js';
import { assumedDemand } from '../../src/model/demand.js';
import { removalEffect, additionEffect } from '../../src/audit/verdicts.js';
import type { PreparedPattern } from '../../src/model/preparePattern.js';

/** A corridor with trip ends spread evenly: each stop's ends proportional to its catchment length. */
function uniformEnds(posM: number[], endsPerM: number, tripsPerDay = 100): Corridor {
  const n = posM.length;
  const board = posM.map((x, j) => {
    const lo = j === 0 ? x : (posM[j - 1] + x) / 2;
    const hi = j === n - 1 ? x : (x + posM[j + 1]) / 2;
    return ((hi - lo) * endsPerM) / 2;
  });
  return new Corridor({ posM, boardPerDay: board, alightPerDay: board.slice(), tripsPerDay });
}

const always: CostSettings = { walkSpeedMps: 1.2, walkWeight: 2, lostTimePerStopS: 20, stoppingModel: 'always' };

function prepOf(corridor: Corridor): PreparedPattern {
  return { corridor } as unknown as PreparedPattern; // removalEffect and additionEffect read only the corridor
}

describe('corridor walk', () => {
  it('adds a*b/(a+b) per trip end when a stop with neighbours 200 m and 200 m away is removed: 100 m', () => {
    // [D] design notes section 4: 200/200 gives 100 m
    const c = uniformEnds([0, 200, 400, 600, 800], 0.5);
    const before = c.walkBetweenM(200, 400) + c.walkBetweenM(400, 600);
    const after = c.walkBetweenM(200, 600);
    const ends = 0.5 * 200; // trip ends in the removed stop's catchment
    expect((after - before) / ends).toBeCloseTo(100, 9);
  });
  it('adds 75 m per trip end for neighbours 100 m and 300 m away', () => {
    // [D] design notes section 4: 100/300 gives 75 m
    const c = uniformEnds([0, 200, 300, 600, 800], 0.5);
    const before = c.walkBetweenM(200, 300) + c.walkBetweenM(300, 600);
    const after = c.walkBetweenM(200, 600);
    expect((after - before) / (0.5 * 200)).toBeCloseTo(75, 9);
  });
  it('walks s/4 on average with stops every s metres', () => {
    // [D] the square-root law's premise: trip ends uniform, nearest stop, mean walk s/4
    const pos = Array.from({ length: 11 }, (_, k) => k * 300);
    const c = uniformEnds(pos, 1);
    let walk = 0;
    for (let k = 0; k < 10; k++) walk += c.walkBetweenM(pos[k], pos[k + 1]);
    expect(walk / c.endsBetween(0, 3000)).toBeCloseTo(300 / 4, 9);
  });
});

describe('removal and addition effects', () => {
  it('weighs the walk added by w/v and saves N*P*p for riders on board', () => {
    // [D] design notes section 4, by hand: stops at 0, 200, 400 m; uniform origins before destinations,
    // catchments 100, 200, 100 m, riders from i to j in proportion to the product of the catchments.
    // 4 boardings per trip-km * 0.4 km * 50 trips = 80 riders; 0->2 riders = 80 * 100*100 / 50000 = 16 (N,
    // on board through stop 1); trip ends at stop 1 = 2 * 80 * 200*100 / 50000 = 64.
    const pos = [0, 200, 400];
    const d = assumedDemand('x', pos, 50, { boardingsPerTripKm: 4 });
    expect(d.boardPerDay[1] + d.alightPerDay[1]).toBeCloseTo(64, 9);
    const c = new Corridor({ posM: pos, boardPerDay: d.boardPerDay, alightPerDay: d.alightPerDay, tripsPerDay: 50 });
    for (const model of ['always', 'poisson'] as const) {
      const e = removalEffect(prepOf(c), 1, { ...always, stoppingModel: model });
      const P = model === 'always' ? 1 : 1 - Math.exp(-64 / 50);
      expect(e.walkAddedPaxMinPerDay).toBeCloseTo(((2 / 1.2) * 64 * 100) / 60, 9);
      expect(e.rideSavedPaxMinPerDay).toBeCloseTo((16 * P * 20) / 60, 9);
      expect(e.runTimeSavedPerTripS).toBeCloseTo(P * 20, 12);
      expect(e.netPaxMinPerDay).toBeCloseTo(e.walkAddedPaxMinPerDay - e.rideSavedPaxMinPerDay, 12);
    }
  });
  it('counts riders who move to a neighbour as no longer passing it', () => {
    // a rider who now alights at the stop before no longer rides through it: its through load drops
    const pos = [0, 200, 400, 600, 800];
    const d = assumedDemand('x', pos, 50, { boardingsPerTripKm: 4 });
    const c = new Corridor({ posM: pos, boardPerDay: d.boardPerDay, alightPerDay: d.alightPerDay, tripsPerDay: 50 });
    const before = servedStopCost(c, 0, 200, 400, 1, always);
    const after = servedStopCost(c, 0, 200, 600, 1, always);
    expect(after.throughPerDay).toBeLessThan(before.throughPerDay);
    expect(before.throughPerDay).toBeCloseTo(d.loadDepartingPerDay[1] - d.boardPerDay[1], 9);
  });
  it("counts the neighbours' extra stopping under the Poisson model", () => {
    const pos = [0, 200, 400, 600, 800];
    const c = uniformEnds(pos, 0.02, 10); // lambda = 0.4 per stop per trip
    const s: CostSettings = { ...always, stoppingModel: 'poisson' };
    const e = removalEffect(prepOf(c), 2, s);
    // by hand: each neighbour takes half the removed stop's 4 trip ends per day, lambda 0.4 -> 0.6
    const P = (l: number) => 1 - Math.exp(-l);
    const busSaved = 20 * (P(0.4) - 2 * (P(0.6) - P(0.4)));
    expect(e.runTimeSavedPerTripS).toBeCloseTo(busSaved, 9);
  });
  it('is exactly the change in the set cost', () => {
    const pos = [0, 150, 260, 420, 500, 700, 910];
    const d = assumedDemand('x', pos, 30, { boardingsPerTripKm: 5 });
    const c = new Corridor({ posM: pos, boardPerDay: d.boardPerDay, alightPerDay: d.alightPerDay, tripsPerDay: 30 });
    const s: CostSettings = { ...always, stoppingModel: 'poisson' };
    const all = [0, 1, 2, 3, 4, 5, 6];
    for (const m of [1, 2, 3, 4, 5]) {
      const e = removalEffect(prepOf(c), m, s);
      const delta =
        (servedSetCostS(
          c,
          all.filter((k) => k !== m),
          s,
        ) -
          servedSetCostS(c, all, s)) /
        60;
      expect(e.netPaxMinPerDay).toBeCloseTo(delta, 9);
    }
  });
  it('mirrors a removal when a stop is added back at the same place', () => {
    const pos = [0, 200, 400, 600, 800];
    const c = uniformEnds(pos, 0.3, 20);
    const without = uniformEnds([0, 200, 600, 800], 0.3, 20);
    const s: CostSettings = { ...always, stoppingModel: 'poisson' };
    const rem = removalEffect(prepOf(c), 2, s);
    const add = additionEffect(prepOf(without), 1, 400, s);
    expect(add.netPaxMinPerDay).toBeCloseTo(-rem.netPaxMinPerDay, 9);
    expect(add.ridersAffectedPerDay).toBeCloseTo(rem.ridersAffectedPerDay, 9);
  });
  it('serves a stop with catchment midpoint to midpoint', () => {
    const c = uniformEnds([0, 200, 400], 1, 10);
    const st = servedStopCost(c, 0, 200, 400, 1, always);
    expect(st.endsPerDay).toBeCloseTo(200, 9);
    expect(st.probability).toBe(1);
  });
});
