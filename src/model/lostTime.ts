// Time lost by riders on board when the bus serves a stop: doors, braking and accelerating from cruise
// speed, and the wait to re-enter traffic. Per-passenger boarding time is left out: it is spent whichever
// stop a rider uses.

export interface LostTimeOptions {
  doorTimeS: number;
  accelMps2: number;
  decelMps2: number;
  reentryDelayS: number;
}

/** The braking-and-accelerating part alone: V/(2a) + V/(2d) seconds (kinematics, constant rates). */
export function brakingAcceleratingS(cruiseSpeedMps: number, { accelMps2, decelMps2 }: { accelMps2: number; decelMps2: number }): number {
  if (!(cruiseSpeedMps >= 0) || !(accelMps2 > 0) || !(decelMps2 > 0)) {
    throw new RangeError(`brakingAcceleratingS: expected V >= 0 and a, d > 0, got V=${cruiseSpeedMps} a=${accelMps2} d=${decelMps2}`);
  }
  return cruiseSpeedMps / (2 * accelMps2) + cruiseSpeedMps / (2 * decelMps2);
}

/** p = t_doors + V/(2a) + V/(2d) + t_reentry, seconds per stop served. */
export function lostTimePerStopS(cruiseSpeedMps: number, { doorTimeS, accelMps2, decelMps2, reentryDelayS }: LostTimeOptions): number {
  return doorTimeS + brakingAcceleratingS(cruiseSpeedMps, { accelMps2, decelMps2 }) + reentryDelayS;
}
