// Candidates as a programme: each listed figure is the marginal effect given those ranked above it, so any
// prefix of the list adds up and equals whatif of the same set. Checked by exact enumeration of every
// prefix on small hand-made corridors, and on nyct-bus-manhattan.zip (top 20 within 1 %) when present.
import { describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { handmadeNetwork } from '../helpers/handmade.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { evaluateScenario } from '../../src/whatif/whatif.js';
import { programmeScenario } from '../../src/audit/programme.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { buildPatterns } from '../../src/network/buildPatterns.js';
import { ROOT } from '../helpers/cli.js';

const MANHATTAN = join(ROOT, '..', 'shared', 'feeds', 'nyct-bus-manhattan.zip');

describe('programmeCandidates', () => {
  it.each([
    ['uniform close stops', Array.from({ length: 16 }, (_, k) => k * 50)],
    ['uneven stops with a wide gap', [0, 90, 170, 260, 330, 900, 980, 1050, 1130, 1210, 1290, 1800, 1870, 1950]],
    // long enough that most accepted edits lie beyond the reach of the other candidates, whose figures are
    // then kept rather than weighed again: the prefixes must still add up exactly
    [
      'a long corridor of close stops and wide gaps',
      Array.from({ length: 60 }, (_, k) => k * 70 + (k % 9 === 0 ? 0 : 25 * (k % 3)) + Math.floor(k / 15) * 900),
    ],
  ])('%s: every prefix sum equals whatif of the same set', (_, distM) => {
    const { feed, patterns } = handmadeNetwork({ distM, tripsPerDay: 80, sharedAt: 4 });
    const r = runAudit(feed, patterns, { generatedAt: '2026-01-01T00:00:00Z' });
    expect(r.candidates.length).toBeGreaterThan(1);
    let sum = 0;
    for (let k = 1; k <= r.candidates.length; k++) {
      sum += r.candidates[k - 1].netPaxMinPerDay;
      expect(r.candidates[k - 1].netPaxMinPerDay, `rank ${k} still saves riders time`).toBeLessThan(0);
      // exact enumeration: the joint evaluation of the first k, computed afresh by whatif
      const joint = evaluateScenario(feed, patterns, programmeScenario(r.candidates.slice(0, k)), {}).totals.netPaxMinPerDay;
      expect(sum, `prefix ${k}`).toBeCloseTo(joint, 6);
    }
  });

  it.skipIf(!existsSync(MANHATTAN))(
    'on nyct-bus-manhattan.zip, whatif of the top 20 removals together equals the list sum within 1 %',
    async () => {
      const feed = await readFeed(MANHATTAN, { date: 'auto' });
      const patterns = buildPatterns(feed, { date: feed.date ?? undefined });
      const r = runAudit(feed, patterns, { generatedAt: '2026-01-01T00:00:00Z' });
      const top = r.candidates.filter((c) => c.action === 'remove').slice(0, 20);
      expect(top.length).toBe(20);
      // removals only: the marginals of removals ranked among additions still add up per set when the
      // additions between them are left out only if they share no pattern; so weigh the whole prefix up to the 20th removal
      const last = r.candidates.indexOf(top[19]);
      const prefix = r.candidates.slice(0, last + 1);
      const listSum = prefix.reduce((s, c) => s + c.netPaxMinPerDay, 0);
      const joint = evaluateScenario(feed, patterns, programmeScenario(prefix), {}).totals.netPaxMinPerDay;
      expect(Math.abs(joint - listSum) / Math.abs(listSum)).toBeLessThan(0.01);
      const onlyRemovals = evaluateScenario(feed, patterns, programmeScenario(top), {}).totals.netPaxMinPerDay;
      const removalSum = top.reduce((s, c) => s + c.netPaxMinPerDay, 0);
      expect(Math.abs(onlyRemovals - removalSum) / Math.abs(removalSum)).toBeLessThan(0.01);
    },
    600_000,
  );
});
