// A limited-stop pattern beside a local: its long gaps that the local serves with stops of its own are
// not flagged wide and get no proposed stop; gaps the local does not serve (too few trips, the other
// direction, stops too far away) still are. Hand-made network in the invented city of Vellmoor.
import { describe, expect, it } from 'vitest';
import type { Pattern } from '../../src/network/types.js';
import type { Stop } from '../../src/gtfs/types.js';
import type { PreparedPattern } from '../../src/model/preparePattern.js';
import { prepareAudit } from '../../src/audit/prepareAudit.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { LOCAL_NEAR_M } from '../../src/audit/localCover.js';
import { haversineM } from '../../src/network/geodesy.js';
import { handmadeNetwork } from '../helpers/handmade.js';

const LOCAL_AT = [0, 200, 400, 600, 800, 1000, 1200, 1400, 1600, 1800, 2000, 2200];
const LIMITED_AT = [0, 5, 11]; // local stop positions where the limited pattern calls (1000 m gaps, then 1200 m)
const params = { cruise_speed_mps: 11.176 };

/** The local V1 of the hand-made network, plus a limited pattern X on route X calling near LIMITED_AT. */
function withLimited({ localTrips = 60, limitedTrips = 60, offsetNorthM = 0, reverseLocal = false } = {}) {
  const net = handmadeNetwork({ distM: LOCAL_AT, tripsPerDay: localTrips, sharedAt: 3 });
  const { feed, patterns } = net;
  const v1 = patterns.patterns[0];
  let stopIdx = LIMITED_AT.map((j) => v1.stopIdx[j]);
  if (offsetNorthM !== 0) {
    // stops of its own, offsetNorthM metres north of the local's
    stopIdx = LIMITED_AT.map((j) => {
      const s = feed.stops[v1.stopIdx[j]];
      const own: Stop = { ...s, id: `x-${j}`, name: `${s.name} (limited)`, lat: s.lat + offsetNorthM / 111_320 };
      feed.stops.push(own);
      feed.stopIndex.set(own.id, feed.stops.length - 1);
      return feed.stops.length - 1;
    });
  }
  const d = LIMITED_AT.map((j) => LOCAL_AT[j]);
  const x: Pattern = {
    ...v1,
    id: 'X:0:1',
    routeId: 'X',
    stopIdx,
    distAlongM: d,
    offsetFromShapeM: d.map(() => null),
    passengerStop: d.map(() => true),
    timepoint: d.map(() => false),
    gapRunTimeS: d.slice(1).map(() => 120),
    gapTimeInterpolated: d.slice(1).map(() => false),
    scheduledDwellS: d.map(() => 0),
    tripsPerDay: limitedTrips,
    tripIds: [],
    runTimeS: 240,
    lengthM: d[d.length - 1],
  };
  if (reverseLocal) {
    const n = v1.stopIdx.length;
    patterns.patterns[0] = {
      ...v1,
      stopIdx: [...v1.stopIdx].reverse(),
      distAlongM: v1.distAlongM.map((_, j) => v1.distAlongM[n - 1] - v1.distAlongM[n - 1 - j]),
    };
  }
  feed.routes.set('X', { id: 'X', agencyId: 'VT', shortName: '1X', longName: 'Harbour limited', type: 3 });
  patterns.patterns.push(x);
  return { feed, patterns };
}

const coverOfX = (net: ReturnType<typeof withLimited>) => {
  const { preps } = prepareAudit(net.feed, net.patterns, { params });
  return gapCovers(preps.find((p) => p.pattern.id === 'X:0:1')!);
};

/** The cover of each model gap of a prepared pattern. */
const gapCovers = (prep: PreparedPattern) => prep.modelStops.slice(1).map((_, m) => prep.gapLocalCover(m));

describe('gaps served by a local', () => {
  it('finds the local behind each gap of the limited pattern, and not the other way round', () => {
    const net = withLimited();
    expect(coverOfX(net)).toEqual(['1', '1']);
    const { preps } = prepareAudit(net.feed, net.patterns, { params });
    // the local's own gaps have no local beside them: the limited pattern skips stops, it serves none between
    expect(gapCovers(preps.find((p) => p.pattern.id === 'V1:0:1')!).every((c) => c === null)).toBe(true);
  });

  it('does not flag them wide, proposes no stop in them, and says so', () => {
    const net = withLimited();
    const r = runAudit(net.feed, net.patterns, { params });
    const gaps = r.gaps.filter((g) => g.patternId === 'X:0:1');
    expect(gaps.every((g) => g.coveredByLocal === '1' && !g.wide)).toBe(true);
    const x = r.patterns.find((p) => p.patternId === 'X:0:1')!;
    expect(gaps.every((g) => g.gapM > x.bandHighM)).toBe(true); // above the band: would be wide otherwise
    expect(x.wideGaps).toBe(0);
    expect(r.candidates.some((c) => c.action === 'add' && c.patternIds.includes('X:0:1'))).toBe(false);
    expect(r.warnings.find((w) => w.code === 'gap-served-by-local')?.count).toBe(2);
  });

  it('still flags them when the local runs too few trips, the other way, or too far off', () => {
    expect(coverOfX(withLimited({ localTrips: 10, limitedTrips: 60 }))).toEqual([null, null]); // 10 < 25 % of 60
    expect(coverOfX(withLimited({ reverseLocal: true }))).toEqual([null, null]);
    const near = withLimited({ offsetNorthM: 60 });
    expect(coverOfX(near)).toEqual(['1', '1']);
    const far = withLimited({ offsetNorthM: 2 * LOCAL_NEAR_M });
    const s = far.feed.stops;
    expect(
      haversineM(s[far.patterns.patterns[2].stopIdx[0]].lat, s[far.patterns.patterns[2].stopIdx[0]].lon, s[0].lat, s[0].lon),
    ).toBeGreaterThan(LOCAL_NEAR_M);
    expect(coverOfX(far)).toEqual([null, null]);
    const r = runAudit(far.feed, far.patterns, { params });
    expect(r.patterns.find((p) => p.patternId === 'X:0:1')!.wideGaps).toBe(2);
  });
});

describe("a limited variant under its local's route_id", () => {
  it('is judged against that local: its long gaps are covered, not wide, and get no proposed stop', () => {
    const net = withLimited();
    // the limited pattern X:0:1 moved under route V1, as a feed with one route_id for both services has it
    const x = net.patterns.patterns.find((p) => p.id === 'X:0:1')!;
    x.routeId = 'V1';
    x.id = 'V1:0:2';
    const r = runAudit(net.feed, net.patterns, { params });
    const gaps = r.gaps.filter((g) => g.patternId === 'V1:0:2');
    expect(gaps.length).toBe(2);
    expect(gaps.every((g) => g.coveredByLocal === '1 (pattern V1:0:1)' && !g.wide)).toBe(true);
    expect(r.candidates.some((c) => c.action === 'add' && c.patternIds.includes('V1:0:2'))).toBe(false);
    // and the local's gaps are not covered by its limited variant, which serves no stop between them
    expect(r.gaps.filter((g) => g.patternId === 'V1:0:1').every((g) => g.coveredByLocal === null)).toBe(true);
  });
});
