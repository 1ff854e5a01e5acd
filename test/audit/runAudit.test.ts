// The whole audit on a hand-made Vellmoor network: every field filled, verdicts and candidates consistent
// with the model, the walking policy respected, sensitivity and observed data honoured.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { StopspanError } from '../../src/common/errors.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { bandRatios } from '../../src/model/band.js';
import type { ObservedData } from '../../src/realtime/types.js';
import { handmadeNetwork } from '../helpers/handmade.js';
import { checkFeed } from '../../src/check/check.js';
import { brakingAcceleratingS } from '../../src/model/lostTime.js';
import type { ObservedPattern } from '../../src/realtime/types.js';
import type { ModelParams } from '../../src/model/params.js';
import { tempDir } from '../helpers/tempDir.js';

// stops about 110 m apart over 6 km (mean trip 2 km): the square-root optimum at 25 mph is about 184 m
const closeSpacing = Array.from({ length: 56 }, (_, j) => j * 110 + (j % 3 === 0 ? 0 : 8));

describe('runAudit', () => {
  const { feed, patterns } = handmadeNetwork({ distM: closeSpacing, tripsPerDay: 80 });
  const params: Partial<ModelParams> = { cruise_speed_mps: 11.176, stopping_model: 'always' };
  const r = runAudit(feed, patterns, { params, generatedAt: '2026-10-14T00:00:00Z' });

  it('fills the result with finite numbers and the parameters with sources', () => {
    expect(r.tool.name).toBe('stopspan');
    expect(r.date).toBe('2026-10-14');
    expect(r.feed.publisher).toBe('Vellmoor Transit');
    expect(Object.keys(r.params).length).toBe(14);
    expect(r.params.cruise_speed_mps).toMatchObject({ value: 11.176, source: 'user' });
    expect(r.params.walk_speed_mps.source).toBe('M');
    expect(r.demandSource).toBe('assumed');
    expect(r.assumptions.length).toBeGreaterThan(5);
    for (const p of r.patterns) {
      for (const [k, v] of Object.entries(p)) if (typeof v === 'number') expect(Number.isFinite(v), k).toBe(true);
      expect(p.demandSource).toBe('assumed');
      expect(p.costCurve.length).toBeGreaterThan(10);
      const [lo, hi] = bandRatios(0.05);
      expect(p.bandLowM / p.optimalSpacingM).toBeCloseTo(lo, 9);
      expect(p.bandHighM / p.optimalSpacingM).toBeCloseTo(hi, 9);
      expect(p.paxMinLostPerDay).toBeGreaterThanOrEqual(0);
      expect(p.optimalCostPerRiderS).toBeLessThanOrEqual(p.currentCostPerRiderS + 1e-9);
    }
    expect(r.stops.length).toBe(closeSpacing.length + 3);
    expect(r.headline.patterns).toBe(2);
    expect(r.headline.stops).toBe(closeSpacing.length + 2);
    expect(r.sensitivity.map((s) => s.label)).toEqual(['walk_weight=1.5', 'walk_weight=2.5', 'band_tolerance=0.05', 'band_tolerance=0.10']);
  });

  it('fixes terminals and the stop shared with another route, and flags close stops by the band', () => {
    const v1 = r.stops.filter((s) => s.patternId === 'V1:0:1');
    expect(v1[0]).toMatchObject({ verdict: 'fixed', fixedReason: 'terminal', removalNetPaxMinPerDay: null });
    expect(v1[v1.length - 1].fixedReason).toBe('terminal');
    expect(v1[5]).toMatchObject({ verdict: 'fixed', fixedReason: 'transfer' });
    const p = r.patterns.find((x) => x.patternId === 'V1:0:1')!;
    for (const s of v1) {
      if (s.verdict === 'fixed') continue;
      const spacing = (s.gapBeforeM! + s.gapAfterM!) / 2;
      expect(s.verdict).toBe(spacing < p.bandLowM && s.removalNetPaxMinPerDay! < 0 ? 'close' : spacing > p.bandHighM ? 'wide' : 'ok');
      expect(s.removalNetPaxMinPerDay).not.toBeNull();
    }
    expect(p.closeStops).toBe(v1.filter((s) => s.verdict === 'close').length);
    // stops about 110 m apart against an optimum near 184 m: close, and the optimiser drops some
    expect(p.closeStops).toBeGreaterThan(0);
    expect(p.optimalStopCount).toBeLessThan(p.stopCount);
    expect(p.paxMinLostPerDay).toBeGreaterThan(0);
  });

  it('ranks candidates by net passenger-minutes, never a fixed stop, never opening a gap above the policy', () => {
    expect(r.candidates.length).toBeGreaterThan(0);
    // in the order accepted, each the best marginal saving left (rounding noise aside)
    for (let i = 1; i < r.candidates.length; i++)
      expect(r.candidates[i].netPaxMinPerDay).toBeGreaterThanOrEqual(r.candidates[i - 1].netPaxMinPerDay - 1e-9);
    r.candidates.forEach((c, i) => expect(c.rank).toBe(i + 1));
    const fixed = new Set(r.stops.filter((s) => s.verdict === 'fixed').map((s) => s.stopId));
    const removed = new Set(r.candidates.filter((c) => c.action === 'remove').map((c) => c.stopId));
    for (const id of removed) expect(fixed.has(id)).toBe(false);
    for (const c of r.candidates) expect(c.netPaxMinPerDay).toBeCloseTo(c.walkAddedPaxMinPerDay - c.rideSavedPaxMinPerDay, 9);
    // apply every proposed removal at once: no gap above 800 m appears
    const v1 = r.stops.filter((s) => s.patternId === 'V1:0:1' && !removed.has(s.stopId));
    for (let i = 1; i < v1.length; i++) expect(v1[i].distAlongM - v1[i - 1].distAlongM).toBeLessThanOrEqual(800);
  });

  it('never proposes adjacent removals that together break a tight walking policy', () => {
    const tight = runAudit(feed, patterns, { params: { ...params, max_gap_m: 300 } });
    const removed = new Set(tight.candidates.filter((c) => c.action === 'remove').map((c) => c.stopId));
    expect(removed.size).toBeGreaterThan(0);
    const v1 = tight.stops.filter((s) => s.patternId === 'V1:0:1' && !removed.has(s.stopId));
    for (let i = 1; i < v1.length; i++) expect(v1[i].distAlongM - v1[i - 1].distAlongM).toBeLessThanOrEqual(300);
  });

  it('honours a keep-list and rejects unknown stop ids in it', () => {
    const keepId = r.candidates.find((c) => c.action === 'remove')!.stopId;
    const kept = runAudit(feed, patterns, { params, keep: [keepId] });
    expect(kept.stops.find((s) => s.stopId === keepId)).toMatchObject({ verdict: 'fixed', fixedReason: 'keep' });
    expect(kept.candidates.some((c) => c.stopId === keepId)).toBe(false);
    expect(() => runAudit(feed, patterns, { keep: ['nowhere'] })).toThrow(StopspanError);
  });

  it('rejects bad parameters before computing anything', () => {
    expect(() => runAudit(feed, patterns, { params: { walk_weight: 0 } })).toThrow(/invalid parameter walk_weight/);
  });

  it('marks robust candidates only when they save time in every sensitivity case', () => {
    const sens = r.sensitivity;
    expect(sens[0].meanOptimalSpacingM).toBeGreaterThan(sens[1].meanOptimalSpacingM); // lighter walk weight, longer optimum
    expect(sens[3].closeStops).toBeLessThanOrEqual(sens[2].closeStops); // wider band, fewer flags
    for (const s of sens) expect(s.candidatesKept).toBeLessThanOrEqual(Math.min(10, r.candidates.length));
  });

  it('uses observed lost time, cruise speed and stop shares where realtime data has them', () => {
    const v1 = patterns.patterns[0];
    const observed: ObservedData = {
      source: 'rt.zip',
      snapshotsRead: 10,
      snapshotsSkipped: 0,
      tripsMatched: 5,
      tripsUnmatched: 0,
      byPattern: new Map([
        [
          v1.id,
          {
            patternId: v1.id,
            tripsObserved: 5,
            meanDwellS: 12,
            lostTimePerStopS: 17.5,
            dwellFixedS: 10.5,
            stopLossS: 7,
            cruiseSpeedMps: 7,
            stopShare: v1.stopIdx.map(() => 0.5),
            gapRunTimeS: v1.stopIdx.slice(1).map(() => null),
          },
        ],
      ]),
      warnings: [],
    };
    const o = runAudit(feed, patterns, { params: {}, observed });
    const p = o.patterns.find((x) => x.patternId === v1.id)!;
    expect(p).toMatchObject({ lostTimeSource: 'observed', lostTimePerStopS: 17.5, cruiseSpeedMps: 7, cruiseSpeedSource: 'observed' });
    expect(o.lostTimeSource).toBe('observed');
    expect(p.observed).toEqual({
      tripsObserved: 5,
      dwellS: 12,
      doorTimeS: 10.5,
      stopLossS: 7,
      cruiseSpeedMps: 7,
      stopShare: 0.5,
      lostTimeParts: ['door_time', 'stop_loss'],
    });
    const mid = o.stops.find((s) => s.patternId === v1.id && s.stopIndex === 3)!;
    expect(mid.stopProbability).toBeCloseTo(0.5, 9);
  });

  it('takes demand from a ridership file and marks it observed', () => {
    const dir = tempDir('stopspan-audit-');
    const file = join(dir, 'ridership.csv');
    const rows = closeSpacing.map((_, j) => `v1-${j},V1,${j < closeSpacing.length - 1 ? 30 : 0},${j > 0 ? 30 : 0}`);
    writeFileSync(file, 'stop_id,route_id,boardings,alightings\n' + rows.join('\n') + '\n');
    const o = runAudit(feed, patterns, { params, ridership: file });
    expect(o.demandSource).toBe('observed');
    const v1 = o.stops.filter((s) => s.patternId === 'V1:0:1');
    expect(v1[3].boardingsPerDay).toBeCloseTo(30, 9);
    expect(v1.every((s) => s.demandSource === 'observed')).toBe(true);
    expect(o.warnings.some((w) => w.code === 'ridership-stop-missing')).toBe(true); // V2's own stops have no rows
  });

  it('warns when a pattern of a subway or rail route is audited with the bus model', () => {
    expect(r.warnings.some((w) => w.code === 'bus-model-off-street')).toBe(false); // buses only
    const net = handmadeNetwork({ distM: closeSpacing, tripsPerDay: 80 });
    net.feed.routes.set('V2', { ...net.feed.routes.get('V2')!, type: 1 }); // V2 becomes a subway line
    const o = runAudit(net.feed, net.patterns, { params });
    const w = o.warnings.find((x) => x.code === 'bus-model-off-street');
    expect(w?.count).toBe(1);
    expect(w?.examples).toEqual(['V2:0:1 (metro)']);
  });

  it('chooses the stopping model per pattern by the data it has when stopping_model is auto (the default)', () => {
    const dir = tempDir('stopspan-audit-');
    const file = join(dir, 'ridership.csv');
    const rows = closeSpacing.map((_, j) => `v1-${j},V1,${j < closeSpacing.length - 1 ? 30 : 0},${j > 0 ? 30 : 0}`);
    writeFileSync(file, 'stop_id,route_id,boardings,alightings\n' + rows.join('\n') + '\n');
    const assumed = runAudit(feed, patterns, { params: { cruise_speed_mps: 11.176 } });
    expect(assumed.patterns.every((p) => p.stoppingModel === 'always')).toBe(true);
    expect(assumed.stops.every((s) => s.stopProbability === 1)).toBe(true);
    const counted = runAudit(feed, patterns, { params: { cruise_speed_mps: 11.176 }, ridership: file });
    expect(counted.patterns.every((p) => p.stoppingModel === 'poisson')).toBe(true);
    // Poisson [design notes]: 30 boardings and 30 alightings a day over 80 trips, lambda = 0.75, P = 1 - e^-0.75
    const mid = counted.stops.find((s) => s.patternId === 'V1:0:1' && s.stopIndex === 3)!;
    expect(mid.stopProbability).toBeCloseTo(1 - Math.exp(-60 / 80), 6);
    // on assumed demand the optimum is the plain square-root law, whatever boardings per km are assumed
    const more = runAudit(feed, patterns, { params: { cruise_speed_mps: 11.176, assumed_boardings_per_trip_km: 12 } });
    expect(more.patterns[0].optimalSpacingM).toBeCloseTo(assumed.patterns[0].optimalSpacingM, 9);
    expect(more.patterns[0].paxMinLostPerDay).toBeGreaterThan(assumed.patterns[0].paxMinLostPerDay);
    // an explicit model wins over auto
    const forced = runAudit(feed, patterns, { params: { cruise_speed_mps: 11.176, stopping_model: 'poisson' } });
    expect(forced.patterns.every((p) => p.stoppingModel === 'poisson')).toBe(true);
    expect(forced.params.stopping_model.source).toBe('user');
    expect(assumed.params.stopping_model.note).toMatch(/always on \d+/);
  });
});

describe('runAudit with observed data beside set values and the schedule', () => {
  const { feed, patterns } = handmadeNetwork({ distM: closeSpacing, tripsPerDay: 80 });
  const v1 = patterns.patterns[0];
  const archive = (o: Partial<ObservedPattern>): ObservedData => ({
    source: 'rt.zip',
    snapshotsRead: 10,
    snapshotsSkipped: 0,
    tripsMatched: 5,
    tripsUnmatched: 0,
    byPattern: new Map([
      [
        v1.id,
        {
          patternId: v1.id,
          tripsObserved: 5,
          meanDwellS: 14,
          lostTimePerStopS: 19,
          dwellFixedS: 9,
          stopLossS: 10,
          cruiseSpeedMps: 8,
          stopShare: v1.stopIdx.map(() => 0.5),
          gapRunTimeS: v1.stopIdx.slice(1).map(() => null),
          ...o,
        },
      ],
    ]),
    warnings: [],
  });

  it('lets a value set explicitly win over an observed one, with a warning naming both', () => {
    const r = runAudit(feed, patterns, { params: { cruise_speed_mps: 10, door_time_s: 4 }, observed: archive({}) });
    const p = r.patterns.find((x) => x.patternId === v1.id)!;
    expect(p).toMatchObject({ cruiseSpeedMps: 10, cruiseSpeedSource: 'user' });
    // the set speed carries its own braking and accelerating, not the loss fitted with the observed speed
    expect(p.lostTimePerStopS).toBeCloseTo(4 + brakingAcceleratingS(10, { accelMps2: 1.22, decelMps2: 1.22 }) + 2, 9);
    expect(p.lostTimeSource).toBe('default');
    expect(p.observed).toMatchObject({ doorTimeS: 9, stopLossS: 10, cruiseSpeedMps: 8, lostTimeParts: [] });
    const w = (code: string) => r.warnings.find((x) => x.code === code);
    expect(w('observed-overridden-cruise-speed-mps')?.message).toMatch(/cruise_speed_mps set explicitly \(10 m\/s\)/);
    expect(w('observed-overridden-cruise-speed-mps')?.examples).toEqual([`${v1.id}: set 10 m/s, observed 8 m/s`]);
    expect(w('observed-overridden-door-time-s')?.examples).toEqual([`${v1.id}: set 4 s, observed 9 s`]);
    expect(w('observed-overridden-stop-loss')?.examples[0]).toMatch(new RegExp(`^${v1.id}: set [\\d.]+ s, observed 10 s$`));
    // without set values the observed ones are used, both parts
    const o = runAudit(feed, patterns, { observed: archive({}) }).patterns.find((x) => x.patternId === v1.id)!;
    expect(o).toMatchObject({ cruiseSpeedMps: 8, cruiseSpeedSource: 'observed', lostTimePerStopS: 19, lostTimeSource: 'observed' });
    expect(o.observed?.lostTimeParts).toEqual(['door_time', 'stop_loss']);
  });

  it('serves a stop without an observed share on assumed demand, as every stop is without an archive', () => {
    const shares = v1.stopIdx.map((_, j) => (j === 3 ? null : 0.5));
    const r = runAudit(feed, patterns, { observed: archive({ stopShare: shares }) });
    const stop = (j: number) => r.stops.find((s) => s.patternId === v1.id && s.stopIndex === j)!;
    expect(stop(3).stopProbability).toBe(1);
    expect(stop(4).stopProbability).toBeCloseTo(0.5, 9);
    expect(r.patterns.find((x) => x.patternId === v1.id)!.observed?.stopShare).toBeCloseTo(0.5, 9);
  });

  it('falls back, for stopping_model=observed without an archive, to the rule without one, and says so', () => {
    const r = runAudit(feed, patterns, { params: { stopping_model: 'observed' } });
    expect(r.patterns.every((p) => p.stoppingModel === 'always')).toBe(true); // demand assumed
    expect(r.warnings.find((w) => w.code === 'no-observed-stopping')?.message).toMatch(/every stop served \(demand assumed\)/);
  });

  it('takes the typical speed for a schedule faster than any plausible speed explains, warns naming the pattern, and check agrees', () => {
    // 6 km with 54 stops served in 10 minutes: no cruise speed up to 25 m/s keeps to it
    const fast = handmadeNetwork({ distM: closeSpacing, tripsPerDay: 80, runTimeS: 600 });
    const r = runAudit(fast.feed, fast.patterns, {});
    const p = r.patterns.find((x) => x.patternId === v1.id)!;
    expect(p.cruiseSpeedSource).toBe('estimated');
    expect(p.cruiseSpeedMps).toBeCloseTo(11.176, 3); // 25 mph, not the 25 m/s ceiling
    // [S] HCM 2010 transit delay expression, via the design notes: 9.17 s braking and accelerating at
    // 25 mph with a = d = 4.0 ft/s2 (the default 1.22 m/s2 is that rate rounded, so within 0.05 s);
    // [C] Levinson 1983 (TRR 915): 5 s fixed dwell; re-entry 2 s assumed
    expect(p.lostTimePerStopS).toBeCloseTo(5 + 9.17 + 2, 1);
    const w = r.warnings.find((x) => x.code === 'schedule-too-fast');
    expect(w?.count).toBe(1);
    expect(w?.examples[0]).toMatch(new RegExp(`^${v1.id}: no cruise speed keeps to it, highest plausible 25, used 11.18$`));
    const c = checkFeed(fast.feed, fast.patterns, { today: '2026-10-14' });
    expect(c.counts['implausible-speed']).toBe(1);
    expect(c.findings.find((f) => f.code === 'implausible-speed')!.examples[0].ids.pattern).toBe(v1.id);
    // the ordinary schedule (4 m/s overall) is neither
    expect(runAudit(feed, patterns, {}).warnings.some((x) => x.code === 'schedule-too-fast')).toBe(false);
    expect(checkFeed(feed, patterns, { today: '2026-10-14' }).counts['implausible-speed']).toBe(0);
  });
});
