// The evidence rule for additions on the real Manhattan bus feed, with no land-use layer: among the top 25
// additions none lies inside Central Park away from its edges (the transverse roads), between LaGuardia's
// terminals, or on Randalls and Wards Islands (parks, stadiums and hospitals). The places are test
// geography: boxes drawn here from their corners' coordinates [M, from a map, to about 30 m].
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { readFeed } from '../../src/gtfs/index.js';
import { buildPatterns } from '../../src/network/index.js';
import { runAudit } from '../../src/audit/runAudit.js';
import type { AuditResult } from '../../src/audit/types.js';
import { localFrame } from '../../src/network/geodesy.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
const DATE = '2026-10-14';
const have = existsSync(BUS);
if (!have) console.warn(`skipping the real-feed addition test: ${BUS} not found (set STOPSPAN_FEEDS)`);

// Central Park's corners: 59 St at Central Park West and at 5 Av, 110 St at 5 Av and at Central Park West
const PARK: [number, number][] = [
  [40.7681, -73.9819],
  [40.7644, -73.973],
  [40.7969, -73.9495],
  [40.8005, -73.9581],
];
const PARK_INSET_M = 120; // the park's edge streets (Central Park West, 5 Av, 59 St, 110 St) are not inside it
const frame = localFrame(40.78, -73.97);
/** Metres inside the park (negative outside): the least distance to its four sides, corners counter-clockwise. */
function insidePark(lat: number, lon: number): number {
  const x = frame.x(lon);
  const y = frame.y(lat);
  let least = Infinity;
  for (let i = 0; i < 4; i++) {
    const [a, b] = [PARK[i], PARK[(i + 1) % 4]];
    const x1 = frame.x(a[1]),
      y1 = frame.y(a[0]),
      x2 = frame.x(b[1]),
      y2 = frame.y(b[0]);
    least = Math.min(least, ((x2 - x1) * (y - y1) - (y2 - y1) * (x - x1)) / Math.hypot(x2 - x1, y2 - y1));
  }
  return least;
}
const BOXES: { name: string; lat: [number, number]; lon: [number, number] }[] = [
  { name: 'LaGuardia terminals', lat: [40.768, 40.7775], lon: [-73.888, -73.862] },
  { name: 'Wards Island', lat: [40.781, 40.792], lon: [-73.9335, -73.918] },
  { name: 'Randalls Island', lat: [40.792, 40.803], lon: [-73.929, -73.913] },
];
function place(lat: number, lon: number): string {
  if (insidePark(lat, lon) > PARK_INSET_M) return 'Central Park';
  for (const b of BOXES) if (lat >= b.lat[0] && lat <= b.lat[1] && lon >= b.lon[0] && lon <= b.lon[1]) return b.name;
  return '';
}

describe.skipIf(!have)('additions on nyct-bus-manhattan.zip without a land-use layer', () => {
  let r: AuditResult;
  beforeAll(async () => {
    const feed = await readFeed(BUS, { date: DATE });
    r = runAudit(feed, buildPatterns(feed, { date: DATE }), { generatedAt: '2026-10-14T00:00:00Z' });
  }, 240_000);

  it('the test geography holds the places it names', () => {
    // stops the feed names for them: a transverse-road stop, a LaGuardia terminal, a Randalls Island stop
    expect(place(40.7806, -73.9645)).toBe('Central Park'); // the middle of the 79 St transverse
    expect(place(40.7809, -73.9724)).toBe(''); // Central Park West at 79 St: the edge street
    expect(place(40.7717, -73.8686)).toBe('LaGuardia terminals');
    expect(place(40.7917, -73.9262)).toBe('Wards Island');
    expect(place(40.7973, -73.9213)).toBe('Randalls Island');
    expect(place(40.799, -73.9316)).toBe(''); // 1 Av at Paladino Av, Manhattan across the river
  });

  it('proposes no stop among the top 25 additions in the park, between the terminals or on the islands', () => {
    const adds = r.candidates.filter((c) => c.action === 'add').slice(0, 25);
    expect(adds.length).toBe(25);
    expect(adds.map((c) => [c.stopName, place(c.lat, c.lon)]).filter(([, p]) => p !== '')).toEqual([]);
    for (const c of adds) expect(c.evidence).toMatch(/^\d+ stops? of routes? .+ within a walk of the site$/);
  });

  it('lists those gaps for review, with their length and reason and no passenger-minute figure', () => {
    const named = r.reviewGaps.map((g) => place(g.lat, g.lon));
    for (const p of ['Central Park', 'LaGuardia terminals', 'Wards Island', 'Randalls Island']) expect(named, p).toContain(p);
    for (const g of r.reviewGaps) {
      expect(g.gapM).toBeGreaterThan(0);
      expect(['fast-stretch', 'long-straight-empty', 'no-stop-near']).toContain(g.reason);
      expect(Object.keys(g).some((k) => /pax|min/i.test(k))).toBe(false);
    }
  });
});
