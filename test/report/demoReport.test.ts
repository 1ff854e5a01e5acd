// The whole report folder for the demo feed of Vellmoor, from the real audit: summary.json validates,
// the CSVs read back with csv-parse row for row, and every stop of stops.geojson sits exactly at the
// coordinates the feed's own stops.txt gives (read here independently with yauzl and csv-parse).

import { existsSync } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import { parse } from 'csv-parse/sync';
import yauzl from 'yauzl';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditFeed } from '../../src/audit/auditFeed.js';
import type { AuditResult } from '../../src/audit/types.js';
import { writeReport } from '../../src/report/writeReport.js';

const FEED = new URL('../../fixtures/demo/demo-feed.zip', import.meta.url).pathname;
const RIDERSHIP = new URL('../../fixtures/demo/ridership.csv', import.meta.url).pathname;
const haveDemo = existsSync(FEED) && existsSync(RIDERSHIP);
if (!haveDemo) console.warn('demo report test skipped: fixtures/demo is absent');

function readZipEntry(zipPath: string, name: string): Promise<string> {
  return new Promise((resolvePromise, reject) => {
    yauzl.open(zipPath, { lazyEntries: true }, (err, zip) => {
      if (err || !zip) return reject(err);
      zip.on('entry', (entry: yauzl.Entry) => {
        if (entry.fileName !== name) return zip.readEntry();
        zip.openReadStream(entry, (e2, stream) => {
          if (e2 || !stream) return reject(e2);
          const chunks: Buffer[] = [];
          stream.on('data', (c: Buffer) => chunks.push(c));
          stream.on('end', () => {
            zip.close();
            resolvePromise(Buffer.concat(chunks).toString('utf8'));
          });
        });
      });
      zip.on('end', () => reject(new Error(`${name} not in ${zipPath}`)));
      zip.readEntry();
    });
  });
}

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
    const validate = new Ajv2020.default({ allErrors: true, strict: true, allowUnionTypes: true, formats: { 'date-time': true } }).compile(schema);
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
    const stopsTxt = parse(await readZipEntry(FEED, 'stops.txt'), { columns: true, bom: true, trim: true }) as Record<string, string>[];
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

  it('writes a self-contained index.html well under a megabyte', async () => {
    const html = await readFile(join(out, 'index.html'), 'utf8');
    expect(Buffer.byteLength(html)).toBeLessThan(1024 * 1024);
    expect(html).toContain('observed demand');
    expect(html).not.toMatch(/\s(src|href)\s*=\s*["']?(https?:)?\/\//i);
  });
});
