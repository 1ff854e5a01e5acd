// The whole report folder for the demo feed of Vellmoor, from the real audit: summary.json validates,
// the CSVs read back with csv-parse row for row, and every stop of stops.geojson sits exactly at the
// coordinates the feed's own stops.txt gives (read here independently with yauzl and csv-parse).

import { existsSync } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import { parse } from 'csv-parse/sync';
import { readZipEntry } from '../helpers/zip.js';
import geodesicPkg from 'geographiclib-geodesic';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditFeed } from '../../src/audit/auditFeed.js';
import type { AuditResult } from '../../src/audit/types.js';
import { writeReport } from '../../src/report/writeReport.js';

const FEED = new URL('../../fixtures/demo/demo-feed.zip', import.meta.url).pathname;
const RIDERSHIP = new URL('../../fixtures/demo/ridership.csv', import.meta.url).pathname;
const haveDemo = existsSync(FEED) && existsSync(RIDERSHIP);
if (!haveDemo) console.warn('demo report test skipped: fixtures/demo is absent');

describe.skipIf(!haveDemo)('the demo feed report folder', () => {
  let work: string;
  let out: string;
  let result: AuditResult;

  beforeAll(async () => {
    work = await mkdtemp(join(tmpdir(), 'stopspan-demo-report-'));
    out = join(work, 'demo');
    result = (await auditFeed(FEED, { ridership: RIDERSHIP })).result;
    await writeReport(result, out);
  });
  afterAll(async () => {
    if (work) await rm(work, { recursive: true, force: true });
  });

  it('writes a summary.json that validates against the schema', async () => {
    const schema = JSON.parse(await readFile(new URL('../../schema/summary.schema.json', import.meta.url), 'utf8'));
    const validate = new Ajv2020.default({ allErrors: true, strict: true, allowUnionTypes: true, formats: { 'date-time': true } }).compile(
      schema,
    );
    const doc = JSON.parse(await readFile(join(out, 'summary.json'), 'utf8'));
    validate(doc);
    expect(validate.errors ?? []).toEqual([]);
    expect(doc.demand_source).toBe('observed');
    expect(doc.counts.stop_rows).toBe(result.stops.length);
  });

  it('writes CSVs that csv-parse reads back row for row', async () => {
    const stops = parse(await readFile(join(out, 'stops.csv'), 'utf8'), { columns: true }) as Record<string, string>[];
    expect(stops.length).toBe(result.stops.length);
    stops.forEach((r, i) => {
      expect(r.stop_id).toBe(result.stops[i].stopId);
      expect(r.verdict).toBe(result.stops[i].verdict);
    });
    const patterns = parse(await readFile(join(out, 'patterns.csv'), 'utf8'), { columns: true }) as Record<string, string>[];
    expect(patterns.map((p) => p.pattern_id)).toEqual(result.patterns.map((p) => p.patternId));
    const cands = parse(await readFile(join(out, 'candidates.csv'), 'utf8'), { columns: true }) as Record<string, string>[];
    expect(cands.length).toBe(result.candidates.length);
  });

  it("places every stop of stops.geojson at the feed's own stops.txt coordinates, lon then lat", async () => {
    const stopsTxt = parse((await readZipEntry(FEED, 'stops.txt')).toString('utf8'), { columns: true, bom: true, trim: true }) as Record<
      string,
      string
    >[];
    const byId = new Map(stopsTxt.map((s) => [s.stop_id, [Number(s.stop_lon), Number(s.stop_lat)]]));
    const gj = JSON.parse(await readFile(join(out, 'stops.geojson'), 'utf8'));
    expect(gj.features.length).toBe(result.stops.length);
    for (const f of gj.features) {
      const want = byId.get(f.properties.stop_id);
      expect(want, f.properties.stop_id).toBeDefined();
      // RFC 7946 section 3.1.1 [C]: longitude first; six decimals per section 11.2
      expect(Math.abs(f.geometry.coordinates[0] - want![0])).toBeLessThanOrEqual(5e-7);
      expect(Math.abs(f.geometry.coordinates[1] - want![1])).toBeLessThanOrEqual(5e-7);
    }
    const lines = JSON.parse(await readFile(join(out, 'patterns.geojson'), 'utf8'));
    for (const f of lines.features) expect(f.geometry.coordinates.length).toBeGreaterThanOrEqual(2);
  });

  it('shows a planner every kind of finding: close stops, removals that save time, busy stops that stay, additions, fixed stops', async () => {
    expect(result.headline.closeStops).toBeGreaterThan(0);
    const removals = result.candidates.filter((c) => c.action === 'remove');
    const additions = result.candidates.filter((c) => c.action === 'add');
    expect(removals.length).toBeGreaterThanOrEqual(5);
    expect(additions.length).toBeGreaterThanOrEqual(5);
    for (const c of result.candidates) expect(c.netPaxMinPerDay, `${c.action} ${c.stopId}`).toBeLessThan(0); // a saving
    // the removals are the old town's quiet stops on routes 1 and 2
    expect(removals.filter((c) => /^(MKT|CAT)-/.test(c.stopId)).length / removals.length).toBeGreaterThan(0.8);
    // each leaves its neighbours at most a few blocks apart: the straight-line gap between them, measured with
    // geographiclib (Karney's WGS84 geodesic) from the feed's own stops.txt, stays under 400 m, the
    // quarter-mile local-bus spacing many agencies use (common practice, from memory)
    const stopsTxt = parse((await readZipEntry(FEED, 'stops.txt')).toString('utf8'), { columns: true, bom: true, trim: true }) as Record<
      string,
      string
    >[];
    const ll = new Map(stopsTxt.map((s) => [s.stop_id, [Number(s.stop_lat), Number(s.stop_lon)]]));
    let measured = 0;
    for (const c of removals.filter((x) => /^(MKT|CAT)-/.test(x.stopId))) {
      for (const pid of c.patternIds) {
        const ps = result.stops.filter((s) => s.patternId === pid);
        const i = ps.findIndex((s) => s.stopId === c.stopId);
        const [a, b] = [ll.get(ps[i - 1].stopId)!, ll.get(ps[i + 1].stopId)!];
        expect(geodesicPkg.Geodesic.WGS84.Inverse(a[0], a[1], b[0], b[1]).s12, `${pid} without ${c.stopId}`).toBeLessThan(400);
        measured++;
      }
    }
    expect(measured).toBeGreaterThan(0);
    // busy old-town corners stay: close to a neighbour, yet removing them would cost riders time
    const busyClose = result.stops.filter(
      (s) => /^(MKT|CAT)-/.test(s.stopId) && s.gapBeforeM !== null && s.gapBeforeM < 130 && (s.removalNetPaxMinPerDay ?? 0) > 50,
    );
    expect(busyClose.length).toBeGreaterThanOrEqual(5);
    // terminals and the transfer stop are fixed
    expect(result.stops.some((s) => s.stopId === 'CSQ' && s.verdict === 'fixed')).toBe(true);
    expect(result.stops.filter((s) => s.verdict === 'fixed').length).toBeGreaterThanOrEqual(result.patterns.length * 2);
  });

  it('writes a self-contained index.html well under a megabyte', async () => {
    const html = await readFile(join(out, 'index.html'), 'utf8');
    expect(Buffer.byteLength(html)).toBeLessThan(1024 * 1024);
    expect(html).toContain('observed demand');
    expect(html).not.toMatch(/\s(src|href)\s*=\s*["']?(https?:)?\/\//i);
  });
});
