// The model's closed forms against the check values of the design notes and the published constants
// they come from.
import { describe, expect, it } from 'vitest';
import { costPerRiderS, sqrtLawSpacingM } from '../../src/model/sqrtLaw.js';
import { bandM, bandRatios, relativeCost } from '../../src/model/band.js';
import { brakingAcceleratingS, lostTimePerStopS } from '../../src/model/lostTime.js';
import { poissonStopProbability, stopProbability } from '../../src/model/stopping.js';
import { localOptimalSpacingM } from '../../src/model/localOptimum.js';

const FT = 0.3048; // international foot, exact by definition (1959 agreement)
const MPH = 0.44704; // exact by definition

describe('square-root law', () => {
  it('gives 268.3 m for v=1.2, p=20, L=3000, w=2 and 379.5 m with one trip end fixed', () => {
    // [D] check values of the design notes, section 4
    const input = { walkSpeedMps: 1.2, lostTimePerStopS: 20, meanTripLengthM: 3000, walkWeight: 2 };
    expect(sqrtLawSpacingM(input)).toBeCloseTo(268.3, 1);
    expect(sqrtLawSpacingM(input, { oneEndFixed: true })).toBeCloseTo(379.5, 1);
  });
  it('gives 399.5 m for v=1.33, p=30, L=4000, w=2', () => {
    // [D] design notes section 4
    expect(sqrtLawSpacingM({ walkSpeedMps: 1.33, lostTimePerStopS: 30, meanTripLengthM: 4000, walkWeight: 2 })).toBeCloseTo(399.5, 1);
  });
  it('costs 447.2 s per rider at the optimum, 466.7 s at 200 m and 483.3 s at 400 m', () => {
    // [D] design notes section 4
    const input = { walkSpeedMps: 1.2, lostTimePerStopS: 20, meanTripLengthM: 3000, walkWeight: 2 };
    const s = sqrtLawSpacingM(input);
    expect(costPerRiderS(s, input)).toBeCloseTo(447.2, 1);
    expect(costPerRiderS(200, input)).toBeCloseTo(466.7, 1);
    expect(costPerRiderS(400, input)).toBeCloseTo(483.3, 1);
  });
  it('is the minimum of the cost curve', () => {
    const input = { walkSpeedMps: 1.2, lostTimePerStopS: 20, meanTripLengthM: 3000, walkWeight: 2 };
    const s = sqrtLawSpacingM(input);
    for (const f of [0.9, 0.99, 1.01, 1.1]) expect(costPerRiderS(s * f, input)).toBeGreaterThan(costPerRiderS(s, input));
  });
  it('lands near the published optima for their inputs', () => {
    // Furth & Rahbee 2000 (TRR 1731) found about 400 m optimal [C, via design notes]; with the design's
    // second check inputs the law gives the same order (399.5 m). Order of magnitude only.
    const s = sqrtLawSpacingM({ walkSpeedMps: 1.33, lostTimePerStopS: 30, meanTripLengthM: 4000, walkWeight: 2 });
    expect(s).toBeGreaterThan(300);
    expect(s).toBeLessThan(500);
  });
});

describe('near-optimal band', () => {
  it('has roots 0.729 and 1.372 at 5 % and 0.642 and 1.558 at 10 %', () => {
    // [D] design notes section 4. The exact 5 % roots are 1.05 -/+ sqrt(1.05^2 - 1) = 0.72984 and 1.37016;
    // the notes' 0.729 is truncated and their 1.372 is 1/0.729, so those two are held to 0.002.
    const [a, b] = bandRatios(0.05);
    expect(Math.abs(a - 0.729)).toBeLessThan(0.002);
    expect(Math.abs(b - 1.372)).toBeLessThan(0.002);
    expect(a).toBeCloseTo(0.72984, 5);
    expect(b).toBeCloseTo(1.37016, 5);
    const [c, d] = bandRatios(0.1);
    expect(c).toBeCloseTo(0.642, 3);
    expect(d).toBeCloseTo(1.558, 3);
  });
  it('puts the cost exactly at 1 + e on its edges', () => {
    for (const e of [0.01, 0.05, 0.1, 0.25]) {
      const [lo, hi] = bandRatios(e);
      expect(relativeCost(lo)).toBeCloseTo(1 + e, 12);
      expect(relativeCost(hi)).toBeCloseTo(1 + e, 12);
      expect(lo * hi).toBeCloseTo(1, 12);
    }
  });
  it('matches the ratio of the cost curve', () => {
    const input = { walkSpeedMps: 1.2, lostTimePerStopS: 20, meanTripLengthM: 3000, walkWeight: 2 };
    const s = sqrtLawSpacingM(input);
    const { lowM, highM } = bandM(s, 0.05);
    expect(costPerRiderS(lowM, input) / costPerRiderS(s, input)).toBeCloseTo(1.05, 10);
    expect(costPerRiderS(highM, input) / costPerRiderS(s, input)).toBeCloseTo(1.05, 10);
  });
});

describe('lost time per stop', () => {
  it('loses 9.17 s braking and accelerating at 25 mph with 4.0 ft/s2', () => {
    // [S] HCM 2010 transit delay expression, via the design notes: 9.17 s at 25 mph, a = d = 4.0 ft/s2
    expect(brakingAcceleratingS(25 * MPH, { accelMps2: 4 * FT, decelMps2: 4 * FT })).toBeCloseTo(9.17, 2);
  });
  it('adds door time and re-entry delay', () => {
    const p = lostTimePerStopS(25 * MPH, { doorTimeS: 3, accelMps2: 4 * FT, decelMps2: 4 * FT, reentryDelayS: 2 });
    expect(p).toBeCloseTo(3 + 9.17 + 2, 2);
  });
});

describe('stopping probability', () => {
  it('follows P = 1 - exp(-lambda)', () => {
    // [D] Poisson: P(at least one rider) = 1 - e^-lambda; e^-1 = 0.367879 (mathematical constant)
    expect(poissonStopProbability(1)).toBeCloseTo(0.632121, 6);
    expect(poissonStopProbability(0.5)).toBeCloseTo(0.393469, 6);
    expect(poissonStopProbability(2)).toBeCloseTo(0.864665, 6);
    expect(poissonStopProbability(0)).toBe(0);
  });
  it('is 1 under the always-stops model', () => {
    expect(stopProbability(0.01, { model: 'always' })).toBe(1);
  });
  it("keeps an observed share at today's demand and scales its implied rate when demand moves", () => {
    expect(stopProbability(1, { model: 'observed', observedShare: 0.5, baseLambda: 1 })).toBeCloseTo(0.5, 12);
    // implied rate ln 2 doubled: 1 - exp(-2 ln 2) = 0.75
    expect(stopProbability(2, { model: 'observed', observedShare: 0.5, baseLambda: 1 })).toBeCloseTo(0.75, 12);
  });
});

describe('local optimum', () => {
  it('reduces to the square-root law under uniform demand (N = rho L / 2)', () => {
    // [D] design notes section 4
    const v = 1.2,
      p = 20,
      L = 3000,
      w = 2;
    for (const rho of [0.001, 0.01, 0.2]) {
      const N = (rho * L) / 2;
      expect(localOptimalSpacingM(N, rho, { walkSpeedMps: v, lostTimePerStopS: p, walkWeight: w })).toBeCloseTo(
        sqrtLawSpacingM({ walkSpeedMps: v, lostTimePerStopS: p, meanTripLengthM: L, walkWeight: w }),
        9,
      );
    }
  });
  it('is undefined without trip ends', () => {
    expect(localOptimalSpacingM(10, 0, { walkSpeedMps: 1.2, lostTimePerStopS: 20, walkWeight: 2 })).toBeNull();
  });
});
