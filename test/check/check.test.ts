// checkFeed on hand-built Vellmoor feeds: every finding fires on a feed built to trigger it and stays
// silent on the clean feed.
import { coordinateFault } from '../../src/gtfs/coordinateFault.js';
import { describe, expect, it } from 'vitest';
import geodesicPkg from 'geographiclib-geodesic';
import { checkFeed, lastServiceDate } from '../../src/check/check.js';
import { passengerStopsServed } from '../../src/network/patternFigures.js';
import { WARNINGS } from '../../src/common/warningCodes.js';
import { haversineM } from '../../src/network/geodesy.js';
import { FINDINGS, FINDING_CODES, normaliseThresholds, speedFamily } from '../../src/check/findings.js';
import { buildFeed, cleanSpec, street } from '../helpers/buildFeed.js';
import { StopspanError } from '../../src/common/errors.js';

const TODAY = '2026-10-14';
const run = (spec = cleanSpec(), opts = {}) => {
  const { feed, patterns } = buildFeed(spec);
  return checkFeed(feed, patterns, { today: TODAY, ...opts });
};

describe('the findings table', () => {
  it('gives every code a title, a one-line explanation and a severity', () => {
    expect(FINDING_CODES).toHaveLength(11);
    for (const code of FINDING_CODES) {
      expect(FINDINGS[code].title.length).toBeGreaterThan(3);
      expect(FINDINGS[code].explanation).not.toMatch(/\n/);
      expect(['error', 'warning', 'info']).toContain(FINDINGS[code].severity);
    }
  });
  it('rejects a bad threshold naming it', () => {
    expect(() => normaliseThresholds({ twinStopM: -1 })).toThrow(/twinStopM/);
    expect(() => normaliseThresholds({ speedKmh: { bus: { minKmh: 50, maxKmh: 10 } } })).toThrow(StopspanError);
  });
  it('maps route types to speed families, basic and extended', () => {
    // GTFS Schedule reference, routes.txt route_type: 0 tram, 1 subway, 2 rail, 3 bus, 4 ferry, 11 trolleybus [C];
    // extended types 100 railway, 400 urban railway, 700 bus, 900 tram, 1000 water (Google extended route types) [S]
    expect([0, 1, 2, 3, 4, 11].map(speedFamily)).toEqual(['tram', 'metro', 'rail', 'bus', 'ferry', 'bus']);
    expect([100, 401, 700, 900, 1000].map(speedFamily)).toEqual(['rail', 'metro', 'bus', 'tram', 'ferry']);
  });
});

describe('checkFeed', () => {
  it('finds nothing on the clean feed', () => {
    const r = run();
    expect(r.findings).toEqual([]);
    expect(Object.values(r.counts).every((c) => c === 0)).toBe(true);
    expect(r.serviceEnd).toBe('2027-12-31');
  });

  it('twin-stops: two consecutive stops 2 m apart', () => {
    const spec = cleanSpec();
    const s2 = spec.stops[1];
    // 2 m north: 2 / 111 2xx m per degree of latitude
    spec.stops.push({ id: 'S2b', lat: s2.lat + 2 / 111_250, lon: s2.lon });
    spec.trips[0].times.splice(2, 0, ['S2b', 28860, 28860, 400]);
    const r = run(spec);
    expect(r.counts['twin-stops']).toBe(1);
    expect(r.findings[0].examples[0].ids).toMatchObject({ stop_id: 'S2', next_stop_id: 'S2b' });
    // and not when the threshold is lowered below the gap
    expect(run(spec, { thresholds: { twinStopM: 1 } }).counts['twin-stops']).toBe(0);
  });

  it('twin-stops distance agrees with geographiclib within 0.5 %', () => {
    // Karney's geodesics on WGS84 (geographiclib-geodesic) as the outside reference [C]
    const g = (geodesicPkg as any).Geodesic.WGS84.Inverse(52.37, 4.9, 52.37002, 4.90003);
    expect(Math.abs(haversineM(52.37, 4.9, 52.37002, 4.90003) - g.s12) / g.s12).toBeLessThan(0.005);
  });

  it('stop-off-path: a stop 300 m from the shape', () => {
    const spec = cleanSpec();
    spec.offsets = { S3: 300 };
    const r = run(spec);
    expect(r.counts['stop-off-path']).toBe(1);
    expect(r.findings[0].examples[0].ids).toEqual({ stop_id: 'S3', shape_id: 'SH1' });
    spec.offsets = { S3: 60 }; // within the default 100 m
    expect(run(spec).counts['stop-off-path']).toBe(0);
  });

  it('pathless-trip: a trip without shape_id', () => {
    const spec = cleanSpec();
    spec.trips[0].shapeId = '';
    const r = run(spec);
    expect(r.counts['pathless-trip']).toBe(1);
    expect(r.findings.find((f) => f.code === 'pathless-trip')!.severity).toBe('info');
  });

  it('distance-backtrack: shape_dist_traveled falls along a trip', () => {
    // GTFS Schedule reference: shape_dist_traveled values must increase along the trip [C]
    const spec = cleanSpec();
    spec.trips[0].times[3][3] = 700; // after 800 at the previous stop
    const r = run(spec);
    expect(r.counts['distance-backtrack']).toBe(1);
    expect(r.findings[0].examples[0].ids).toEqual({ trip_id: 'T1', stop_sequence: '4' });
  });

  it('distance-backtrack: shape_dist_traveled falls along a shape', () => {
    const spec = cleanSpec();
    spec.shapes![0].dist = [0, 400, 300, 1200, 1600];
    expect(run(spec).counts['distance-backtrack']).toBe(1);
  });

  it('distance-backtrack: trip and shape name the value before a blank they fall from; a fall within rounding passes', () => {
    const spec = cleanSpec();
    spec.shapes![0].dist = [0, 400, NaN, 300, 1600];
    spec.trips[0].times[2][3] = NaN; // blank between 400 and the fall to 300
    spec.trips[0].times[3][3] = 300;
    const back = run(spec).findings.find((f) => f.code === 'distance-backtrack')!;
    expect(back.count).toBe(2);
    expect(back.examples.map((e) => e.detail)).toEqual([
      'trip T1: shape_dist_traveled falls from 400 to 300 at stop_sequence 4',
      'shape SH1: shape_dist_traveled falls from 400 to 300 at point 4',
    ]);
    const rounding = cleanSpec();
    rounding.shapes![0].dist = [0, 400, 400 - 1e-12, 1200, 1600];
    expect(run(rounding).counts['distance-backtrack']).toBe(0);
  });

  it('time-backtrack: a time earlier than the previous stop', () => {
    const spec = cleanSpec();
    spec.trips[0].times[2][1] = 28830; // before the 28860 departure at stop 2
    spec.trips[0].times[2][2] = 28830;
    const r = run(spec);
    expect(r.counts['time-backtrack']).toBe(1);
    expect(r.findings.find((f) => f.code === 'time-backtrack')!.examples[0].detail).toMatch(/08:00:30 after 08:01:00/);
  });

  it('time-backtrack: departure before arrival at one stop', () => {
    // GTFS Schedule reference: departure_time must be at or after arrival_time at the same stop [C]
    const spec = cleanSpec();
    spec.trips[0].times[1] = ['S2', 28870, 28860, 400];
    expect(run(spec).counts['time-backtrack']).toBe(1);
  });

  it('times past 24:00:00 are not a backtrack', () => {
    // GTFS Schedule reference: times may exceed 24:00:00 for trips past midnight [C]
    const spec = cleanSpec();
    spec.trips[0].times = spec.trips[0].times.map(([id, a, d, s]) => [id, a + 16 * 3600, d + 16 * 3600, s]);
    expect(run(spec).counts['time-backtrack']).toBe(0);
  });

  it('implausible-speed: a bus covering 400 m in 5 s, and one crawling', () => {
    const spec = cleanSpec();
    spec.trips[0].times = spec.trips[0].times.map(([id, , , s], k) => [id, 28800 + 5 * k, 28800 + 5 * k, s]);
    const fast = run(spec);
    expect(fast.counts['implausible-speed']).toBe(1);
    expect(fast.findings[0].examples[0].detail).toMatch(/288\.0 km\/h/); // 400 m / 5 s * 3.6 [D]
    spec.trips[0].times = spec.trips[0].times.map(([id, , , s], k) => [id, 28800 + 600 * k, 28800 + 600 * k, s]);
    expect(run(spec).counts['implausible-speed']).toBe(1); // 2.4 km/h < 3 km/h
  });

  it('implausible-speed: the same 288 km/h is fine for rail', () => {
    const spec = cleanSpec();
    spec.routes = [{ id: 'R1', type: 2 }];
    spec.trips[0].times = spec.trips[0].times.map(([id, , , s], k) => [id, 28800 + 5 * k, 28800 + 5 * k, s]);
    // no span between timed stops is flagged; the whole run, 1 600 m with three stops in 20 s, still is (see below)
    const r = run(spec);
    expect(r.counts['implausible-speed']).toBe(1);
    expect(r.findings.find((f) => f.code === 'implausible-speed')!.examples[0].detail).toMatch(
      /^pattern \S+ \(rail\): 1600 m with 3 stops between in 20 s/,
    );
  });

  it('implausible-speed: a whole run faster than any plausible speed explains once the bus stops, as the audit judges it', () => {
    // 1 600 m with three stops between in 90 s: 64 km/h between timed stops, under the 100 km/h bound, but
    // with 5 s door time, 2 s re-entry and 1.22 m/s2 braking and accelerating at each stop no cruise speed
    // up to 25 m/s keeps to it (the shortest run time, at the best V, is about 180 s) [D]
    const spec = cleanSpec();
    spec.trips[0].times = spec.trips[0].times.map(([id, , , s], k) => [id, 28800 + Math.round(22.5 * k), 28800 + Math.round(22.5 * k), s]);
    const r = run(spec);
    expect(r.counts['implausible-speed']).toBe(1);
    expect(r.findings[0].examples[0].detail).toMatch(/stops between in 90 s is faster than any cruise speed up to 90\.0 km\/h/);
    // at 60 s a gap (240 s in all) it is plausible
    spec.trips[0].times = spec.trips[0].times.map(([id, , , s], k) => [id, 28800 + 60 * k, 28800 + 60 * k, s]);
    expect(run(spec).counts['implausible-speed']).toBe(0);
  });

  it('implausible-speed: minute-rounded schedules with zero-time gaps are merged, not flagged', () => {
    const spec = cleanSpec();
    const mins = [0, 0, 2, 2, 4]; // 1 600 m in 240 s = 24 km/h overall
    spec.trips[0].times = spec.trips[0].times.map(([id, , , s], k) => [id, 28800 + 60 * mins[k], 28800 + 60 * mins[k], s]);
    expect(run(spec).counts['implausible-speed']).toBe(0);
  });

  it('coordinate-fault: a stop at 0,0 and one in another country', () => {
    const spec = cleanSpec();
    spec.stops.push({ id: 'Z0', lat: 0, lon: 0 });
    spec.stops.push({ id: 'FAR', lat: 48.85, lon: 2.35 }); // some 430 km away
    spec.stops.push({ id: 'BAD', lat: 95, lon: 4.9 });
    const r = run(spec);
    expect(r.counts['coordinate-fault']).toBe(3);
    expect(r.findings[0].examples.map((e) => e.ids.stop_id).sort()).toEqual(['BAD', 'FAR', 'Z0']);
    // a stop 5 km out of town is not an outlier
    const ok = cleanSpec();
    ok.stops.push({ id: 'NEAR', lat: 52.415, lon: 4.9 });
    expect(run(ok).counts['coordinate-fault']).toBe(0);
  });

  it('coordinate-fault: a stop within five degrees of a pole, by the rule the pattern builder also uses', () => {
    const spec = cleanSpec();
    spec.stops.push({ id: 'POLE', lat: 89.99, lon: 4.9 });
    spec.stops.push({ id: 'SOUTH', lat: -85.5, lon: 4.9 });
    const r = run(spec);
    expect(r.counts['coordinate-fault']).toBe(2);
    const details = r.findings[0].examples.map((e) => e.detail);
    expect(
      details.every((d) => d.endsWith('near a pole')),
      JSON.stringify(details),
    ).toBe(true);
    expect(coordinateFault(89.99, 4.9)).toBe('near a pole');
    // the northernmost bus towns lie below 79 degrees (Longyearbyen, 78.2 N [M]): not a fault
    expect(coordinateFault(78.22, 15.65)).toBe('');
  });

  it('service-ending-soon: fewer than 7 days left, per the GTFS best practice', () => {
    // GTFS Schedule best practices: a feed should be valid for at least the next 7 days, ideally 30 [C]
    const spec = cleanSpec();
    spec.calendar = [{ serviceId: 'WK', days: [true, true, true, true, true, true, true], start: '20260101', end: '20261019' }];
    const r = run(spec); // 2026-10-19 is 5 days after 2026-10-14
    expect(r.counts['service-ending-soon']).toBe(1);
    expect(r.findings[0].severity).toBe('error');
    expect(r.findings[0].examples[0].detail).toMatch(/ends 5 day/);
    spec.calendar[0].end = '20261021'; // exactly 7 days: enough
    expect(run(spec).counts['service-ending-soon']).toBe(0);
  });

  it('lastServiceDate walks back to a running weekday and honours calendar_dates', () => {
    // 2026-12-31 is a Thursday; weekday-only service whose end date is Sunday 2027-01-03 ends Friday 2027-01-01
    const spec = cleanSpec();
    spec.calendar = [{ serviceId: 'WK', days: [true, true, true, true, true, false, false], start: '20260101', end: '20270103' }];
    spec.calendarDates = [{ serviceId: 'WK', date: '20270101', exceptionType: 2 }];
    expect(lastServiceDate(buildFeed(spec).feed)).toBe('20261231');
    spec.calendarDates.push({ serviceId: 'WK', date: '20270110', exceptionType: 1 });
    expect(lastServiceDate(buildFeed(spec).feed)).toBe('20270110');
  });

  it('dangling-reference: parent_station, shape_id and service_id pointing nowhere, and reader warnings', () => {
    // GTFS Schedule reference: parent_station references stops.stop_id; trips.shape_id references shapes [C]
    const spec = cleanSpec();
    spec.stops[0].parentStation = 'NO-SUCH-STATION';
    spec.trips.push({ id: 'T2', shapeId: 'NO-SHAPE', serviceId: 'NO-SERVICE', times: spec.trips[0].times });
    // the reader's own code for trips dropped for their route (the warning table marks it as counted by check)
    spec.warnings = [
      { code: 'trip-unknown-route', message: WARNINGS['trip-unknown-route'].explanation, count: 4, examples: ['trips.txt:7 route_id R9'] },
    ];
    const r = run(spec);
    expect(r.counts['dangling-reference']).toBe(1 + 2 + 4);
    const ex = r.findings.find((f) => f.code === 'dangling-reference')!.examples;
    expect(ex.find((e) => e.ids.warning === 'trip-unknown-route')).toMatchObject({ file: 'trips.txt', line: 7 });
  });

  it('keeps at most maxExamples examples but counts them all', () => {
    const spec = cleanSpec();
    for (let k = 0; k < 8; k++) spec.stops.push({ id: `Z${k}`, lat: 0, lon: 0 });
    const r = run(spec, { maxExamples: 2 });
    expect(r.counts['coordinate-fault']).toBe(8);
    expect(r.findings[0].examples).toHaveLength(2);
  });

  it('orders findings by severity and lets severities be overridden', () => {
    const spec = cleanSpec();
    spec.trips[0].shapeId = ''; // pathless (info)
    spec.stops.push({ id: 'Z0', lat: 0, lon: 0 }); // coordinate-fault (error)
    const r = run(spec);
    expect(r.findings.map((f) => f.code)).toEqual(['coordinate-fault', 'pathless-trip']);
    expect(r.bySeverity).toEqual({ error: 1, warning: 0, info: 1 });
    const o = run(spec, { severities: { 'pathless-trip': 'error' } });
    expect(o.bySeverity.error).toBe(2);
  });

  it('rejects a malformed today', () => {
    expect(() => run(cleanSpec(), { today: '14/10/2026' })).toThrow(/today/);
  });

  it('builds street stops 400 m apart', () => {
    const s = street(2);
    expect(haversineM(s[0].lat, s[0].lon, s[1].lat, s[1].lon)).toBeCloseTo(400, 1);
  });
});

describe('dates and stops served', () => {
  it('service-ended, not service-ending-soon, once the last day of service is before the run date', () => {
    const spec = cleanSpec();
    spec.calendar = [{ serviceId: 'WK', days: [true, true, true, true, true, true, true], start: '20260101', end: '20261010' }];
    const r = run(spec); // 2026-10-10 is 4 days before 2026-10-14
    expect(r.counts['service-ended']).toBe(1);
    expect(r.counts['service-ending-soon']).toBe(0);
    expect(r.findings.find((f) => f.code === 'service-ended')!.examples[0].detail).toMatch(/ended 4 day/);
  });

  it('no-service at error severity when no pattern was checked, naming why', () => {
    const { feed, patterns } = buildFeed(cleanSpec());
    const none = { date: null, basis: 'none' as const, because: 'nothing runs on the run date 2026-10-17 or in the 7 days after it' };
    const r = checkFeed(feed, { ...patterns, patterns: [] }, { today: TODAY, analysis: none });
    expect(r.counts['no-service']).toBe(1);
    expect(r.findings[0]).toMatchObject({ code: 'no-service', severity: 'error' });
    expect(r.findings[0].examples[0].detail).toBe(none.because);
    expect(r.analysis).toEqual(none);
    expect(run().counts['no-service']).toBe(0);
  });

  it('counts passenger stops only as stops served (a timing point where nobody boards or alights is not one)', () => {
    const { feed, patterns } = buildFeed(cleanSpec());
    const p = patterns.patterns[0];
    const all = p.stopIdx.length;
    expect(passengerStopsServed(patterns)).toBe(all);
    const timing = { ...p, passengerStop: p.passengerStop.map((_, i) => i !== 2) };
    expect(passengerStopsServed({ ...patterns, patterns: [timing] })).toBe(all - 1);
    expect(checkFeed(feed, { ...patterns, patterns: [timing] }, { today: TODAY }).network.stopsServed).toBe(all - 1);
  });
});
