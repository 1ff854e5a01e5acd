// observeArchive on an archive the demo generator simulates over a hand-built network: the recovered
// dwell, cruise speed, stop loss and stopping share against the values the simulation used.

import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import GtfsRealtimeBindings from 'gtfs-realtime-bindings';
import { observeArchive, serviceDayOriginS, type ObservedData } from '../../src/realtime/index.js';
import { WarningSink } from '../../src/common/warnings.js';
// @ts-expect-error the generator is a plain ES module without type declarations
import { simulateArchive } from '../../scripts/make-demo-realtime.mjs';
import { buildNetwork } from '../helpers/realtimeNetwork.js';

const ROUTE = {
  N1: { cruiseSpeedMps: 9, dwellS: 16, accelMps2: 1.0, decelMps2: 1.25, reentryS: 2 },
  N2: { cruiseSpeedMps: 12, dwellS: 10, accelMps2: 1.1, decelMps2: 1.1, reentryS: 1 },
} as const;
const stopLossS = (r: (typeof ROUTE)[keyof typeof ROUTE]) =>
  r.cruiseSpeedMps / (2 * r.accelMps2) + r.cruiseSpeedMps / (2 * r.decelMps2) + r.reentryS;

// lambda per stop in [0.6, 2.2] by position, so the Poisson stopping chances are known here
const lambdaOf = (stopId: string) => 0.6 + (1.6 * ((Number(stopId.slice(-2)) * 7) % 11)) / 10;

const net = buildNetwork([
  {
    routeId: 'N1',
    gapsM: [250, 410, 320, 600, 280, 350, 450, 220, 380, 510, 300, 270, 430, 360],
    startsS: Array.from({ length: 40 }, (_, k) => 6 * 3600 + 30 * 60 + k * 240),
  },
  {
    routeId: 'N2',
    gapsM: [500, 650, 420, 800, 560, 700, 480, 610, 530, 720],
    startsS: [],
    frequency: { startS: 6 * 3600 + 30 * 60, endS: 9 * 3600 + 30 * 60, headwayS: 300 },
  },
]);

let dir: string;
let data: ObservedData;
let truth: { stopShare: Record<string, { served: number; visits: number; poissonP: number }> };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-rt-'));
  truth = simulateArchive(
    net.sim,
    {
      windowStartS: 6 * 3600 + 30 * 60,
      windowEndS: 10 * 3600 + 30 * 60,
      pollS: 30,
      routeParams: (id: 'N1' | 'N2') => ROUTE[id],
      lambda: lambdaOf,
      seed: 11,
    },
    (name: string, bytes: Uint8Array) => {
      mkdirSync(dirname(join(dir, name)), { recursive: true });
      writeFileSync(join(dir, name), bytes);
    },
  );
  data = await observeArchive(dir, net.feed, net.patterns);
}, 60_000);

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('observeArchive on a simulated archive', () => {
  it('reads every snapshot except the one DIFFERENTIAL and matches every simulated trip instance', () => {
    // a 4 h window at 30 s: 481 polls, two files each, plus one DIFFERENTIAL file
    expect(data.snapshotsRead).toBe(481 * 2);
    expect(data.snapshotsSkipped).toBe(1);
    expect(data.warnings.find((w) => w.code === 'realtime-differential')?.count).toBe(1);
    expect(data.warnings.find((w) => w.code === 'realtime-vehicle-without-trip')?.count).toBeGreaterThan(0);
    expect(data.tripsUnmatched).toBe(0);
    // N1: 40 scheduled trips; N2: a frequency trip every 300 s for 3 h = 36 instances, told apart by start_time
    expect(data.byPattern.get('N1:0:1')!.tripsObserved).toBe(40);
    expect(data.byPattern.get('N2:0:1')!.tripsObserved).toBe(36);
    expect(data.tripsMatched).toBe(76);
  });

  it('recovers the dwell within 1 s and the cruise speed within 2 % of the simulated values', () => {
    for (const [id, r] of Object.entries(ROUTE)) {
      const p = data.byPattern.get(`${id}:0:1`)!;
      // the simulation dwells dwellS +- 3 s (uniform), rounded to whole seconds
      expect(Math.abs(p.meanDwellS! - r.dwellS)).toBeLessThan(1);
      expect(Math.abs(p.cruiseSpeedMps! / r.cruiseSpeedMps - 1)).toBeLessThan(0.02);
      // braking + accelerating + re-entry loss, V/(2a) + V/(2d) + t_reentry (kinematics [D]), within 1.5 s
      expect(Math.abs(p.stopLossS! - stopLossS(r))).toBeLessThan(1.5);
      // lost time per stop = fixed part of dwell + that loss
      expect(p.lostTimePerStopS).toBeCloseTo(p.dwellFixedS! + p.stopLossS!, 6);
      expect(p.gapRunTimeS.every((x) => x !== null && x > 0)).toBe(true);
    }
  });

  it('gives a stopping share per stop that matches the Poisson chance 1 - exp(-lambda) within three standard errors', () => {
    // P(stop) = 1 - exp(-lambda) for a Poisson count of riders [M, standard in the stop-spacing literature]
    for (const p of net.patterns.patterns) {
      const obs = data.byPattern.get(p.id)!;
      const n = p.stopIdx.length;
      for (let i = 1; i < n - 1; i++) {
        const id = net.feed.stops[p.stopIdx[i]].id;
        const expected = 1 - Math.exp(-lambdaOf(id));
        const trials = obs.stopsObserved![i];
        expect(trials).toBeGreaterThan(25);
        const se = Math.sqrt((expected * (1 - expected)) / trials);
        expect(Math.abs(obs.stopShare[i]! - expected)).toBeLessThan(3 * se + 1e-9);
        // and it is exactly what the simulation did to the trips it observed
        expect(truth.stopShare[id].poissonP).toBeCloseTo(expected, 12);
      }
      expect(obs.stopShare[0]).toBe(1);
      expect(obs.stopShare[n - 1]).toBe(1);
    }
  });

  it('puts the mean stopping share inside the 68-78 % that Levinson observed for local buses in the peak', () => {
    // Levinson 1983, TRR 915: local buses stopped at 68-78 % of stops in the peak [C]
    const shares: number[] = [];
    for (const obs of data.byPattern.values()) shares.push(...(obs.stopShare.slice(1, -1) as number[]));
    const mean = shares.reduce((s, x) => s + x, 0) / shares.length;
    expect(mean).toBeGreaterThan(0.68);
    expect(mean).toBeLessThan(0.78);
  });
});

describe('observeArchive from VehiclePositions alone', () => {
  it('recovers dwell, cruise speed and stopping share from STOPPED_AT observations polled every 5 s', async () => {
    const vpDir = mkdtempSync(join(tmpdir(), 'stopspan-rt-vp-'));
    try {
      simulateArchive(
        net.sim,
        {
          windowStartS: 6 * 3600 + 30 * 60,
          windowEndS: 9 * 3600 + 30 * 60,
          pollS: 5,
          routeParams: (id: 'N1' | 'N2') => ROUTE[id],
          lambda: lambdaOf,
          seed: 12,
          differential: false,
        },
        (name: string, bytes: Uint8Array) => {
          if (name.startsWith('trip-updates/')) return;
          mkdirSync(dirname(join(vpDir, name)), { recursive: true });
          writeFileSync(join(vpDir, name), bytes);
        },
      );
      const vp = await observeArchive(vpDir, net.feed, net.patterns);
      for (const [id, r] of Object.entries(ROUTE)) {
        const p = vp.byPattern.get(`${id}:0:1`)!;
        // bracket midpoints: unbiased over the polling phase, each within one interval (5 s)
        expect(Math.abs(p.meanDwellS! - r.dwellS)).toBeLessThan(1.5);
        expect(Math.abs(p.cruiseSpeedMps! / r.cruiseSpeedMps - 1)).toBeLessThan(0.03);
        const shares = p.stopShare.slice(1, -1) as number[];
        expect(shares.every((s) => s !== null && s > 0.2 && s < 1)).toBe(true);
      }
    } finally {
      rmSync(vpDir, { recursive: true, force: true });
    }
  }, 60_000);
});

describe('observeArchive from sparse VehiclePositions', () => {
  it('leaves the stopping share unset and says why when polling every 30 s cannot tell a pass from a short dwell', async () => {
    const vpDir = mkdtempSync(join(tmpdir(), 'stopspan-rt-vp30-'));
    try {
      simulateArchive(
        net.sim,
        {
          windowStartS: 7 * 3600,
          windowEndS: 8 * 3600,
          pollS: 30,
          routeParams: (id: 'N1' | 'N2') => ROUTE[id],
          lambda: lambdaOf,
          seed: 13,
          differential: false,
        },
        (name: string, bytes: Uint8Array) => {
          if (name.startsWith('trip-updates/')) return;
          mkdirSync(dirname(join(vpDir, name)), { recursive: true });
          writeFileSync(join(vpDir, name), bytes);
        },
      );
      const vp = await observeArchive(vpDir, net.feed, net.patterns);
      const codes = vp.warnings.map((w) => w.code);
      expect(codes).toContain('realtime-coarse-polling');
      expect(codes).toContain('realtime-share-unidentified');
      for (const p of vp.byPattern.values()) expect(p.stopShare.slice(1, -1).every((s) => s === null)).toBe(true);
    } finally {
      rmSync(vpDir, { recursive: true, force: true });
    }
  }, 60_000);
});

describe('observeArchive on bad input', () => {
  const rt = GtfsRealtimeBindings.transit_realtime;
  const base = serviceDayOriginS('20261104', 'Etc/GMT-1') + 7 * 3600;
  function write(d: string, name: string, ts: number, entity: unknown[]) {
    const msg = rt.FeedMessage.fromObject({ header: { gtfsRealtimeVersion: '2.0', incrementality: 0, timestamp: ts }, entity });
    writeFileSync(join(d, name), rt.FeedMessage.encode(msg).finish());
  }

  it('counts unmatched trips, vehicles without trips, out-of-order reports and snapshots of another feed, and skips them', async () => {
    const d = mkdtempSync(join(tmpdir(), 'stopspan-rt-bad-'));
    try {
      const STOPPED = rt.VehiclePosition.VehicleStopStatus.STOPPED_AT;
      write(d, '1.pb', base, [
        {
          id: 'a',
          vehicle: { trip: { tripId: 'N1-T001', startDate: '20261104' }, currentStopSequence: 10, currentStatus: STOPPED, timestamp: base },
        },
        { id: 'b', vehicle: { vehicle: { id: 'deadhead' }, timestamp: base } },
        { id: 'c', vehicle: { trip: { tripId: 'GHOST' }, currentStopSequence: 10, timestamp: base } },
        { id: 'd', vehicle: { trip: { tripId: 'N2-T001', startDate: '20261104' }, currentStopSequence: 10, timestamp: base } },
        {
          id: 'e',
          vehicle: { trip: { tripId: 'N2-T001', startDate: '20261104', startTime: '06:31:00' }, currentStopSequence: 10, timestamp: base },
        },
        {
          id: 'f',
          tripUpdate: { trip: { tripId: 'N1-T002', startDate: '20261107' }, stopTimeUpdate: [{ stopSequence: 10, arrival: { delay: 0 } }] },
        },
      ]);
      write(d, '2.pb', base + 30, [
        { id: 'a', vehicle: { trip: { tripId: 'N1-T001', startDate: '20261104' }, currentStopSequence: 20, timestamp: base - 100 } },
      ]);
      write(d, '3.pb', base + 60, [{ id: 'x', vehicle: { trip: { tripId: 'OTHER-1' }, currentStopSequence: 1, timestamp: base + 60 } }]);
      const w = new WarningSink();
      const obs = await observeArchive(d, net.feed, net.patterns, { warnings: w });
      const count = new Map(obs.warnings.map((x) => [x.code, x.count]));
      expect(obs.snapshotsRead).toBe(2);
      expect(obs.snapshotsSkipped).toBe(1);
      expect(count.get('realtime-other-feed')).toBe(1);
      expect(count.get('realtime-vehicle-without-trip')).toBe(1);
      expect(count.get('realtime-out-of-order')).toBe(1);
      expect(count.get('realtime-trip-unknown')).toBe(1);
      expect(count.get('realtime-frequency-no-start-time')).toBe(1);
      expect(count.get('realtime-frequency-start-mismatch')).toBe(1);
      expect(count.get('realtime-date-mismatch')).toBe(1); // 2026-11-07 is a Saturday; the service runs Monday-Friday
      expect(obs.tripsMatched).toBe(1);
      expect(obs.tripsUnmatched).toBe(4);
    } finally {
      rmSync(d, { recursive: true, force: true });
    }
  });

  it('refuses an invalid option with bad-option', async () => {
    await expect(observeArchive(dir, net.feed, net.patterns, { minTrips: 0 })).rejects.toMatchObject({ code: 'bad-option' });
  });
});
