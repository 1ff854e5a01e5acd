// Express and commuter services: a 3 km non-stop stretch run at highway speed is the service's design, not
// a hole: it is not flagged wide, no stop is proposed in it, and the output says so. The same stretch run
// at a local's pace is still a wide gap. Hand-made route in the invented city of Vellmoor.
import { describe, expect, it } from 'vitest';
import { runAudit } from '../../src/audit/runAudit.js';
import { EXPRESS_STRETCH_M, expressRouteType } from '../../src/audit/expressStretch.js';
import { buildFeed, street } from '../helpers/buildFeed.js';

const params = { cruise_speed_mps: 11.176 };

/** Stops 300 m apart, then 3 000 m without a stop (S8 to S18), then two more; the long gap run in `longS` seconds. */
function expressRoute(longS: number, type = 3) {
  const s = street(20, 300);
  const calls = [...s.slice(0, 8), ...s.slice(17)];
  let t = 28800;
  const times = calls.map((x, k) => {
    if (k > 0) t += k === 8 ? longS : 60;
    return [x.id, t, t] as [string, number, number];
  });
  const net = buildFeed({ stops: s, routes: [{ id: 'X9', shortName: 'X9', type }], trips: [{ id: 'x', routeId: 'X9', times }] });
  for (const p of net.patterns.patterns) p.tripsPerDay = 40;
  return net;
}

describe('express stretches', () => {
  it('leaves a 3 km non-stop run at 60 km/h out of the spacing verdicts, and says so', () => {
    // 3 000 m in 180 s = 16.7 m/s, above a bus's typical 25 mph cruise (11.2 m/s) [M]
    const { feed, patterns } = expressRoute(180);
    const r = runAudit(feed, patterns, { params, generatedAt: 'x' });
    const long = r.gaps.find((g) => g.fromStopId === 'S8')!;
    expect(long.gapM).toBeGreaterThanOrEqual(EXPRESS_STRETCH_M);
    expect(long.gapM).toBeGreaterThan(r.patterns[0].bandHighM); // above the band: wide but for the rule
    expect(long).toMatchObject({ expressStretch: true, wide: false, addNetPaxMinPerDay: null });
    expect(r.candidates.some((c) => c.action === 'add' && c.stopName.startsWith('between Vellmoor S8 and'))).toBe(false);
    expect(r.warnings.find((w) => w.code === 'express-stretch')?.count).toBe(1);
    expect(r.assumptions.some((a) => a.includes('express'))).toBe(true);
    // the short gaps are judged as before
    expect(r.gaps.filter((g) => g.fromStopId !== 'S8').every((g) => !g.expressStretch)).toBe(true);
  });

  it('still flags the same stretch wide when it is run at a local pace', () => {
    // 3 000 m in 600 s = 5 m/s: a local could make that, so the gap is a gap
    const { feed, patterns } = expressRoute(600);
    const r = runAudit(feed, patterns, { params, generatedAt: 'x' });
    const long = r.gaps.find((g) => g.fromStopId === 'S8')!;
    expect(long).toMatchObject({ expressStretch: false, wide: true });
    expect(r.warnings.some((w) => w.code === 'express-stretch')).toBe(false);
  });

  it('treats every gap of a route typed express bus as an express stretch', () => {
    expect(expressRouteType(702)).toBe(true); // GTFS extended route type 702 Express Bus Service [C, GTFS extended route types]
    expect(expressRouteType(3)).toBe(false);
    const { feed, patterns } = expressRoute(600, 702);
    const r = runAudit(feed, patterns, { params, generatedAt: 'x' });
    expect(r.gaps.every((g) => g.expressStretch && !g.wide)).toBe(true);
  });
});
