// checkFeed on the fixture feeds in fixtures/check/: each folder is the clean Vellmoor feed with one fault,
// read by the real reader and pattern builder. The clean folder triggers nothing; each other folder
// triggers its own finding.
import { describe, expect, it } from 'vitest';
import { readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { buildPatterns } from '../../src/network/index.js';
import { readFeed } from '../../src/gtfs/index.js';
import { checkFeed } from '../../src/check/check.js';
import { FINDING_CODES, type FindingCode } from '../../src/check/findings.js';
import { StopspanError } from '../../src/common/errors.js';
import type { PatternSet } from '../../src/network/types.js';

const FIX = resolve(__dirname, '../../fixtures/check');
const TODAY = '2026-10-14'; // a Wednesday

async function check(name: string) {
  const feed = await readFeed(join(FIX, name), { date: 'all' });
  let patterns: PatternSet;
  try {
    patterns = buildPatterns(feed, { date: TODAY });
  } catch (e) {
    // nothing runs on the day: checked with no pattern, as the CLI does
    if (!(e instanceof StopspanError && e.code === 'empty-feed')) throw e;
    patterns = { date: TODAY, patterns: [], routesAtStop: new Map() };
  }
  return checkFeed(feed, patterns, { today: TODAY });
}

/** Findings a fault implies by its nature: a feed whose service ended has none to check today. */
const IMPLIED: Partial<Record<FindingCode, FindingCode[]>> = { 'service-ended': ['no-service'] };

describe('fixture feeds', () => {
  it('has one folder per finding code, plus clean', () => {
    expect(readdirSync(FIX).sort()).toEqual(['clean', ...FINDING_CODES].sort());
  });

  it('clean triggers nothing', async () => {
    const r = await check('clean');
    expect(r.findings).toEqual([]);
  });

  for (const code of FINDING_CODES) {
    it(`${code} triggers ${code}`, async () => {
      const r = await check(code);
      expect(r.counts[code as FindingCode]).toBeGreaterThan(0);
      // and only what it was built for, apart from what a fault implies by its nature
      const also = r.findings.map((f) => f.code).filter((c) => c !== code && !IMPLIED[code]?.includes(c));
      expect(also).toEqual([]);
    });
  }
});

describe('fixture details', () => {
  it('dangling-reference counts the parent_station pointing nowhere and the trip the reader dropped, with its line', async () => {
    const r = await check('dangling-reference');
    expect(r.counts['dangling-reference']).toBe(2);
    // trips.txt line 4 (header is line 1) holds the trip whose route R9 is not in routes.txt
    expect(r.findings[0].examples.map((e) => [e.file, e.line])).toEqual([
      ['stops.txt', undefined],
      ['trips.txt', 4],
    ]);
  });

  it('twin-stops measures the 2 m pair', async () => {
    const r = await check('twin-stops');
    expect(r.findings[0].examples[0].detail).toMatch(/S2 and S2b are 2\.0 m apart/);
  });
});
