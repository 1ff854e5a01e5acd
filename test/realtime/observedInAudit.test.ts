// What an archive's figures become in the audit when the run-time fit cannot be used: equal gaps with every
// stop served leave cruise speed and stop loss inseparable, but the dwell is still observed and used; a fit
// whose stop loss comes out negative is rejected whole. Archives simulated by the demo generator over
// hand-built Vellmoor networks.

import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { observeArchive } from '../../src/realtime/index.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { brakingAcceleratingS } from '../../src/model/lostTime.js';
import { patternsCsv } from '../../src/report/csv.js';
import { summaryObject } from '../../src/report/summaryJson.js';
// @ts-expect-error the generator is a plain ES module without type declarations
import { simulateArchive } from '../../scripts/make-demo-realtime.mjs';
import { buildNetwork } from '../helpers/realtimeNetwork.js';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function simulate(net: ReturnType<typeof buildNetwork>, options: Record<string, unknown>): string {
  const dir = mkdtempSync(join(tmpdir(), 'stopspan-rt-use-'));
  dirs.push(dir);
  simulateArchive(
    net.sim,
    { windowStartS: 7 * 3600, windowEndS: 8 * 3600 + 30 * 60, pollS: 30, differential: false, ...options },
    (name: string, bytes: Uint8Array) => {
      mkdirSync(dirname(join(dir, name)), { recursive: true });
      writeFileSync(join(dir, name), bytes);
    },
  );
  return dir;
}

describe('an archive whose run times cannot separate cruise speed from stop loss', () => {
  // ten equal 400 m gaps, every stop served (lambda 50 riders a trip), every dwell exactly 20 s
  const net = buildNetwork([
    { routeId: 'E1', gapsM: Array(10).fill(400), startsS: Array.from({ length: 12 }, (_, k) => 7 * 3600 + k * 300) },
  ]);
  const route = { cruiseSpeedMps: 10, dwellS: 20, accelMps2: 1.2, decelMps2: 1.2, reentryS: 2 };

  it('yields the observed dwell in the lost time per stop, labelled observed, with the kinematic term from the cruise speed in use', async () => {
    const dir = simulate(net, { routeParams: () => route, lambda: () => 50, seed: 5, dwellJitterS: 0, runNoiseS: 0 });
    const data = await observeArchive(dir, net.feed, net.patterns);
    const obs = data.byPattern.get('E1:0:1')!;
    expect(data.warnings.some((w) => w.code === 'realtime-fit-failed')).toBe(true);
    expect(obs.cruiseSpeedMps).toBeNull();
    expect(obs.meanDwellS).toBe(20);
    expect(obs.dwellFixedS).toBe(20);

    const r = runAudit(net.feed, net.patterns, { observed: data, generatedAt: '2026-11-04T08:00:00Z' });
    const p = r.patterns[0];
    expect(p.lostTimeSource).toBe('observed');
    expect(p.cruiseSpeedSource).toBe('estimated');
    // p = observed door time + V/(2a) + V/(2d) + re-entry at the cruise speed in use (kinematics [D])
    const kin = brakingAcceleratingS(p.cruiseSpeedMps, { accelMps2: 1.22, decelMps2: 1.22 });
    expect(p.lostTimePerStopS).toBeCloseTo(20 + kin + 2, 9);
    expect(p.observed).toMatchObject({
      dwellS: 20,
      doorTimeS: 20,
      stopLossS: null,
      cruiseSpeedMps: null,
      stopShare: 1,
      lostTimeParts: ['door_time'],
    });

    // and the reader sees it: patterns.csv columns at the end of the row, summary.json per pattern
    const [header, row] = patternsCsv(r).split('\r\n');
    const cell = (name: string) => row.split(',')[header.split(',').indexOf(name)];
    expect(cell('lost_time_source')).toBe('observed');
    expect(Number(cell('observed_dwell_s'))).toBe(20);
    expect(Number(cell('observed_door_time_s'))).toBe(20);
    expect(cell('observed_stop_loss_s')).toBe('');
    expect(cell('lost_time_observed_parts')).toBe('door_time');
    // the observed block's columns run together, lost_time_observed_parts last of them
    const cols = header.split(',');
    expect(cols.indexOf('lost_time_observed_parts')).toBe(cols.indexOf('observed_stop_share') + 1);
    const s = summaryObject(r) as { observed: { patterns: Record<string, unknown>[]; trips_matched: number } };
    expect(s.observed.trips_matched).toBe(12);
    expect(s.observed.patterns).toEqual([
      {
        pattern_id: 'E1:0:1',
        trips_observed: 12,
        dwell_s: 20,
        door_time_s: 20,
        stop_loss_s: null,
        cruise_speed_mps: null,
        stop_share: 1,
        lost_time_observed_parts: ['door_time'],
      },
    ]);
  }, 60_000);
});

describe('a run-time fit with a negative stop loss', () => {
  it('is rejected whole: neither its cruise speed nor its stop loss is kept, the dwell still is', async () => {
    // buses that gain 15 s on every gap they stop at (a negative re-entry): no physical stop loss explains that
    const net = buildNetwork([
      {
        routeId: 'G1',
        gapsM: [250, 600, 320, 800, 280, 500, 450, 220, 700, 380],
        startsS: Array.from({ length: 12 }, (_, k) => 7 * 3600 + k * 300),
      },
    ]);
    const route = { cruiseSpeedMps: 9, dwellS: 15, accelMps2: 1, decelMps2: 1, reentryS: -24 };
    const dir = simulate(net, { routeParams: () => route, lambda: () => 0.8, seed: 9 });
    const data = await observeArchive(dir, net.feed, net.patterns);
    const obs = data.byPattern.get('G1:0:1')!;
    const rejected = data.warnings.find((w) => w.code === 'realtime-fit-rejected');
    expect(rejected?.examples[0]).toMatch(/^G1:0:1: [\d.]+ m\/s, -[\d.]+ s$/);
    expect(obs.cruiseSpeedMps).toBeNull();
    expect(obs.stopLossS).toBeNull();
    expect(obs.lostTimePerStopS).toBeNull();
    expect(Math.abs(obs.meanDwellS! - 15)).toBeLessThan(1);

    const p = runAudit(net.feed, net.patterns, { observed: data }).patterns[0];
    expect(p.cruiseSpeedSource).toBe('estimated');
    expect(p.observed?.lostTimeParts).toEqual(['door_time']);
  }, 60_000);
});
