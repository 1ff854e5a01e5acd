// Trunks and transfers on hand-made networks in the invented city of Vellmoor: where routes run together a
// shared stop is one removal candidate over every pattern serving it; where they meet, part or cross it is
// a transfer point, kept with a note naming the routes.
import { describe, expect, it } from 'vitest';
import { runAudit } from '../../src/audit/runAudit.js';
import { transferPoints } from '../../src/audit/transfers.js';
import { buildFeed, street, type StopSpec, type TripSpec } from '../helpers/buildFeed.js';

const params = { cruise_speed_mps: 11.176 };

/** One trip calling at `ids`, `gapS` seconds a gap. */
function trip(id: string, routeId: string, ids: string[], gapS = 20): TripSpec {
  return { id, routeId, times: ids.map((s, k) => [s, 28800 + gapS * k, 28800 + gapS * k] as [string, number, number]) };
}

/** buildFeed's one pattern per trip, each run 60 times a day. */
function network(stops: StopSpec[], tripList: TripSpec[], routes: { id: string; shortName: string }[]) {
  const net = buildFeed({ stops, trips: tripList, routes });
  for (const p of net.patterns.patterns) p.tripsPerDay = 60;
  return net;
}

/** S1..S40 60 m apart along the street; route 1 along all of it, route 2 along S1..S12, then north (N1..N20). */
function trunkNetwork() {
  const s = street(40, 60);
  const north: StopSpec[] = Array.from({ length: 20 }, (_, k) => ({
    id: `N${k + 1}`,
    lat: s[11].lat + ((k + 1) * 60) / 111_320,
    lon: s[11].lon,
    name: `Vellmoor North ${k + 1}`,
  }));
  const ids = s.map((x) => x.id);
  return network(
    [...s, ...north],
    [trip('a', 'R1', ids), trip('b', 'R2', [...ids.slice(0, 12), ...north.map((x) => x.id)])],
    [
      { id: 'R1', shortName: '1' },
      { id: 'R2', shortName: '2' },
    ],
  );
}

describe('trunks and transfers', () => {
  it('makes the stop where two routes part a transfer point, and their shared stops a trunk', () => {
    const { feed, patterns } = trunkNetwork();
    const notes = transferPoints(feed, patterns);
    const idx = (id: string) => feed.stopIndex.get(id)!;
    expect(notes.get(idx('S12'))).toBe('routes 1 and 2 part here');
    for (let k = 2; k <= 11; k++) expect(notes.has(idx(`S${k}`))).toBe(false);
    for (let k = 13; k <= 39; k++) expect(notes.has(idx(`S${k}`))).toBe(false);

    const r = runAudit(feed, patterns, { params, generatedAt: 'x' });
    const part = r.stops.filter((x) => x.stopId === 'S12');
    expect(part.length).toBe(2);
    for (const row of part) expect(row).toMatchObject({ verdict: 'fixed', fixedReason: 'transfer', fixedNote: 'routes 1 and 2 part here' });
    for (const row of r.stops.filter((x) => ['S3', 'S4', 'S10'].includes(x.stopId))) expect(row.fixedReason).toBe('');
    // a trunk stop's removal is one candidate over both routes, its figure the sum of both patterns' own
    // ([D] the corridor cost is a sum over patterns, so removing one stop from both changes it by the sum)
    // (the list is a programme: a candidate's figure is its effect given those ranked above it, so the sum
    // is checked where nothing ranked above it touches its patterns)
    const multi = r.candidates.filter((c) => c.action === 'remove' && c.routeIds.length === 2);
    expect(multi.length).toBeGreaterThan(0);
    const first = multi.filter((c) => !r.candidates.slice(0, c.rank - 1).some((a) => a.patternIds.some((p) => c.patternIds.includes(p))));
    expect(first.length).toBeGreaterThan(0);
    for (const c of first) {
      expect(c.routeIds).toEqual(['R1', 'R2']);
      const rows = r.stops.filter((x) => x.stopId === c.stopId);
      expect(rows.length).toBe(2);
      expect(c.patternIds.length).toBe(2);
      const sum = rows.reduce((n, x) => n + x.removalNetPaxMinPerDay!, 0);
      expect(c.netPaxMinPerDay).toBeCloseTo(sum, 9);
    }
  });

  it('keeps a stop where routes cross, naming them', () => {
    const s = street(7, 150);
    const cross: StopSpec[] = [-2, -1, 1, 2].map((k) => ({ id: `C${k}`, lat: s[3].lat + (k * 150) / 111_320, lon: s[3].lon }));
    const { feed, patterns } = network(
      [...s, ...cross],
      [
        trip(
          'a',
          'R1',
          s.map((x) => x.id),
        ),
        trip('b', 'R2', ['C-2', 'C-1', 'S4', 'C1', 'C2']),
      ],
      [
        { id: 'R1', shortName: '1' },
        { id: 'R2', shortName: '2' },
      ],
    );
    expect(transferPoints(feed, patterns).get(feed.stopIndex.get('S4')!)).toBe('routes 1 and 2 cross here');
  });

  it('does not freeze a local stop because a limited route calls there too', () => {
    const s = street(10, 150);
    const { feed, patterns } = network(
      s,
      [
        trip(
          'l',
          'L',
          s.map((x) => x.id),
        ),
        trip('x', 'LX', ['S1', 'S4', 'S7', 'S10'], 60),
      ],
      [
        { id: 'L', shortName: '7' },
        { id: 'LX', shortName: '7X' },
      ],
    );
    const notes = transferPoints(feed, patterns);
    expect(notes.has(feed.stopIndex.get('S4')!)).toBe(false);
    expect(notes.has(feed.stopIndex.get('S7')!)).toBe(false);
    const r = runAudit(feed, patterns, { params, generatedAt: 'x' });
    expect(r.stops.filter((x) => x.stopId === 'S4').every((x) => x.fixedReason === '')).toBe(true);
  });
});
