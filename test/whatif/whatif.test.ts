// The what-if engine on a hand-built Vellmoor corridor (evenly spaced stops, uniform demand): the walk
// added and the ride saved of one removal against hand computation, agreement with the audit's removal
// figure, the mirror case of an addition, and the scenario errors.
import { describe, expect, it } from 'vitest';
import { evaluateScenario, parseScenario, scenarioFromOptions } from '../../src/whatif/whatif.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { handmadeNetwork } from '../helpers/handmade.js';
import { thrown } from '../helpers/errors.js';
import type { ModelParams } from '../../src/model/params.js';

const even = Array.from({ length: 16 }, (_, j) => j * 200); // 3 km, stops every 200 m
const { feed, patterns } = handmadeNetwork({ distM: even, tripsPerDay: 50, sharedAt: 12 });
const params: Partial<ModelParams> = { cruise_speed_mps: 11.176, stopping_model: 'always' };

describe('evaluateScenario', () => {
  const audit = runAudit(feed, patterns, { params });
  const v1 = audit.stops.filter((s) => s.patternId === 'V1:0:1');

  it('removing one stop adds a*b/(a+b) = 100 m per trip end and saves N*P*p for riders on board', () => {
    const r = evaluateScenario(feed, patterns, { remove: ['v1-6'] }, { params });
    expect(r.patterns.length).toBe(1);
    const e = r.patterns[0];
    const stop = v1[6];
    const ends = stop.boardingsPerDay + stop.alightingsPerDay;
    // [D] design notes section 4: 200/200 m neighbours, 100 m more walking per trip end, weighted w/v = 2/1.2
    expect(e.walkAddedPaxMinPerDay).toBeCloseTo(((2 / 1.2) * ends * 100) / 60, 6);
    expect(e.walkSavedPaxMinPerDay).toBeCloseTo(0, 9);
    // [D] ride saved N * P * p: N riders passing through, P = 1 (always stops), p from 25 mph, doors 3 s, re-entry 2 s
    const p = audit.patterns.find((x) => x.patternId === 'V1:0:1')!.lostTimePerStopS;
    const N = stop.loadDepartingPerDay - stop.boardingsPerDay;
    expect(e.rideSavedPaxMinPerDay).toBeCloseTo((N * 1 * p) / 60, 6);
    expect(e.runTimeSavedPerTripS).toBeCloseTo(p, 9);
    expect(e.vehicleHoursPerDay).toBeCloseTo((p * 50) / 3600, 9);
    expect(e.ridersAffectedPerDay).toBeCloseTo(ends, 6);
    expect(e.largestGapBeforeM).toBeCloseTo(200, 9);
    expect(e.largestGapAfterM).toBeCloseTo(400, 9);
    // the audit's removal figure for the same stop is the same number
    expect(e.netPaxMinPerDay).toBeCloseTo(stop.removalNetPaxMinPerDay!, 6);
    expect(r.cautions[0]).toMatch(/screening tool/);
    expect(r.sensitivity.map((s) => s.label)).toEqual(['walk_weight=1.5', 'walk_weight=2.5']);
    expect(r.sensitivity[0].netPaxMinPerDay).toBeLessThan(r.sensitivity[1].netPaxMinPerDay);
  });

  it('gives the sensitivity walk weights the net the whole scenario has when weighed at that weight', () => {
    // a removal, a move and an addition, so walk is both added and saved; each case is the scenario weighed
    // afresh with walk_weight set to it (the figures are scaled from the base weighing, not weighed again)
    const s3 = feed.stops[feed.stopIndex.get('v1-3')!];
    const s9 = feed.stops[feed.stopIndex.get('v1-9')!];
    const s10 = feed.stops[feed.stopIndex.get('v1-10')!];
    const sc = {
      remove: ['v1-6'],
      move: [{ stop: 'v1-3', lat: s3.lat, lon: s3.lon + 0.0008 }],
      add: [{ lat: (s9.lat + s10.lat) / 2, lon: (s9.lon + s10.lon) / 2, route: 'V1' }],
    };
    const r = evaluateScenario(feed, patterns, sc, { params });
    expect(r.totals.walkSavedPaxMinPerDay).toBeGreaterThan(0);
    for (const c of r.sensitivity) {
      const afresh = evaluateScenario(feed, patterns, sc, { params: { ...params, walk_weight: c.walkWeight } });
      expect(c.netPaxMinPerDay).toBeCloseTo(afresh.totals.netPaxMinPerDay, 9);
    }
  });

  it('adding a stop back where one was removed is the mirror case', () => {
    const gapped = handmadeNetwork({ distM: even.filter((_, j) => j !== 6), tripsPerDay: 50, sharedAt: 11 });
    const s6 = feed.stops[feed.stopIndex.get('v1-6')!];
    const add = evaluateScenario(gapped.feed, gapped.patterns, { add: [{ lat: s6.lat, lon: s6.lon, route: 'V1' }] }, { params });
    const rem = evaluateScenario(feed, patterns, { remove: ['v1-6'] }, { params });
    // the two corridors differ only in how the gap's riders were laid out (one catchment or two halves),
    // so the mirror holds to the walk of the uniform layout
    expect(add.patterns[0].runTimeSavedPerTripS).toBeCloseTo(-rem.patterns[0].runTimeSavedPerTripS, 6);
    expect(add.patterns[0].walkSavedPaxMinPerDay).toBeGreaterThan(0);
    expect(add.patterns[0].largestGapAfterM).toBeCloseTo(200, 6);
  });

  it('moving a stop keeps its riders and reports the changed walk', () => {
    const s = feed.stops[feed.stopIndex.get('v1-3')!];
    const r = evaluateScenario(feed, patterns, { move: [{ stop: 'v1-3', lat: s.lat, lon: s.lon + 0.0008 }] }, { params });
    const e = r.patterns[0];
    expect(e.movedStopIds).toEqual(['v1-3']);
    expect(e.walkAddedPaxMinPerDay).toBeGreaterThan(0);
    expect(e.walkSavedPaxMinPerDay).toBeGreaterThan(0);
    expect(Math.abs(e.runTimeSavedPerTripS)).toBeLessThan(1e-9);
  });

  it('reports coverage within the walking policy before and after', () => {
    const r = evaluateScenario(feed, patterns, { remove: ['v1-2', 'v1-3', 'v1-4', 'v1-5'] }, { params: { ...params, max_gap_m: 400 } });
    const e = r.patterns[0];
    expect(e.coverageBefore).toBe(1);
    // stops at 200 and 1200 m remain: the stretch 400-1000 m is more than 200 m from both
    expect(e.coverageAfter).toBeCloseTo(1 - 600 / 3000, 9);
    expect(r.totals.overPolicyAfter).toBe(1);
  });

  it('refuses unknown stops, terminals, far coordinates, ambiguous names and unknown keys before computing', () => {
    expect(thrown(() => evaluateScenario(feed, patterns, { remove: ['nowhere'] }, { params })).message).toMatch(
      /remove\[0\]: unknown stop "nowhere"/,
    );
    expect(thrown(() => evaluateScenario(feed, patterns, { remove: ['v1-0'] }, { params })).message).toMatch(/terminal of pattern V1:0:1/);
    expect(thrown(() => evaluateScenario(feed, patterns, { add: [{ lat: 52.2, lon: 4.3, route: 'V1' }] }, { params })).message).toMatch(
      /add\[0\]: .* m from the nearest pattern of route V1 \(limit 200 m/,
    );
    expect(thrown(() => evaluateScenario(feed, patterns, { add: [{ lat: 52.1, lon: 4.31, route: 'V7' }] }, { params })).message).toMatch(
      /unknown route V7 \(neither a route_id nor a route_short_name\)/,
    );
    expect(thrown(() => parseScenario({ remove: ['v1-3'], close: ['v1-4'] })).message).toMatch(/invalid scenario key close/);
    expect(thrown(() => parseScenario({})).code).toBe('bad-scenario');
    const twin = handmadeNetwork({ distM: even, tripsPerDay: 50, sharedAt: 12 });
    twin.feed.stops[3].name = twin.feed.stops[4].name;
    const twinError = thrown(() => evaluateScenario(twin.feed, twin.patterns, { remove: [twin.feed.stops[4].name] }, { params }));
    expect(twinError.message).toMatch(/ambiguous \(2 stops\)/);
    expect(twinError.context.choices?.map((c) => c.split(' ')[0])).toEqual(['v1-3', 'v1-4']);
    expect(
      evaluateScenario(twin.feed, twin.patterns, { remove: [{ stop: twin.feed.stops[4].name, both_directions: true }] }, { params })
        .patterns[0].removedStopIds,
    ).toEqual(['v1-3', 'v1-4']);
    expect(evaluateScenario(feed, patterns, { remove: ['Vellmoor Street 7'] }, { params }).patterns[0].removedStopIds).toEqual(['v1-7']);
  });

  it('builds a scenario from command-line strings', () => {
    expect(scenarioFromOptions({ remove: ['a', 'b'], add: ['52.1,4.31:V1'], move: ['v1-3:52.1,4.302'] })).toEqual({
      remove: ['a', 'b'],
      add: [{ lat: 52.1, lon: 4.31, route: 'V1' }],
      move: [{ stop: 'v1-3', lat: 52.1, lon: 4.302 }],
    });
    expect(() => scenarioFromOptions({ add: ['north of here'] })).toThrow(/expected LAT,LON/);
  });
});
