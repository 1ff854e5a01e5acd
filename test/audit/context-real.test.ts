// The Manhattan bus feed audited with the New York subway as context: trunk stops give removal candidates
// over several routes, and none lies within 100 m of a subway stop or station (checked against the subway
// feed's own stops.txt, parsed by csv-parse, not by the project's reader).
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { auditFeed } from '../../src/audit/auditFeed.js';
import { haversineM } from '../../src/network/geodesy.js';
import { WALK_REACH_M } from '../../src/audit/additionEvidence.js';
import { readZipEntry } from '../helpers/zip.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
const SUBWAY = join(FEEDS, 'nyct-subway.zip');
const have = existsSync(BUS) && existsSync(SUBWAY);
if (!have) console.warn(`skipping the audit with the subway as context: ${BUS} or ${SUBWAY} not found (set STOPSPAN_FEEDS)`);

describe.skipIf(!have)('nyct-bus-manhattan.zip with nyct-subway.zip as context', () => {
  it('proposes removals over several routes, none within 100 m of a subway stop, and takes subway stations as evidence for additions', async () => {
    const { result } = await auditFeed(BUS, { date: '2026-10-14', context: [SUBWAY] });
    const rows: Record<string, string>[] = parse(await readZipEntry(SUBWAY, 'stops.txt'), { columns: true, bom: true });
    const subway = rows.map((r) => [Number(r.stop_lat), Number(r.stop_lon)]).filter(([a, b]) => Number.isFinite(a) && Number.isFinite(b));
    expect(subway.length).toBeGreaterThan(400);
    const removals = result.candidates.filter((c) => c.action === 'remove');
    // 2026-12-03: 49 of 162 removals cover several routes (0 of 145 before trunk stops)
    expect(removals.filter((c) => c.routeIds.length > 1).length).toBeGreaterThan(10);
    for (const c of removals) {
      const nearest = Math.min(...subway.map(([a, b]) => haversineM(c.lat, c.lon, a, b)));
      expect(nearest, `${c.stopId} ${c.stopName}`).toBeGreaterThan(100);
    }
    const station = result.stops.filter((s) => s.fixedReason === 'station');
    expect(station.length).toBeGreaterThan(0);
    expect(station.every((s) => /^station .+ \(nyct-subway\), \d+ m$/.test(s.fixedNote))).toBe(true);
    expect(result.warnings.some((w) => w.code === 'context-no-service')).toBe(false);
    // subway stations are evidence for additions: 2026-12-03, 26 of 105 additions name one (7 on a station
    // alone), against 98 additions without the context; each named station is within the walk of the site,
    // measured here on the subway's own stops.txt (csv-parse) by name and place
    const adds = result.candidates.filter((c) => c.action === 'add');
    const named = adds.filter((c) => /station .+ \(nyct-subway\), \d+ m/.test(c.evidence ?? ''));
    expect(named.length).toBeGreaterThan(5);
    for (const c of named) {
      const [, name, metres] = /station (.+?) \(nyct-subway\), (\d+) m/.exec(c.evidence!)!;
      const nearest = Math.min(
        ...rows.filter((r) => r.stop_name === name).map((r) => haversineM(c.lat, c.lon, Number(r.stop_lat), Number(r.stop_lon))),
      );
      expect(nearest, `${c.stopName}: ${c.evidence}`).toBeLessThanOrEqual(WALK_REACH_M + 1);
      expect(Math.abs(nearest - Number(metres)), `${c.stopName}: ${c.evidence}`).toBeLessThanOrEqual(1);
    }
  }, 600_000);
});
