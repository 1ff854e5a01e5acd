// One table for turning internal metres into what people read: metres/kilometres or feet/miles.
// Only renderers use it; everything inside the library stays in metres.

import { StopspanError } from '../common/errors.js';
import { groupedFixed } from './numberText.js';

export type Units = 'metric' | 'imperial';

export const FEET_PER_METRE = 1 / 0.3048; // international foot, exactly 0.3048 m
export const METRES_PER_MILE = 1609.344; // international mile, exactly 1609.344 m

export function checkUnits(units: unknown): Units {
  if (units === 'metric' || units === 'imperial') return units;
  throw new StopspanError('bad-option', `invalid option units: expected "metric" or "imperial", got ${JSON.stringify(units)}`); // the value is in the message
}

export function metresToFeet(m: number): number {
  return m * FEET_PER_METRE;
}

export function metresToMiles(m: number): number {
  return m / METRES_PER_MILE;
}

/** A short distance for people, e.g. "230 m" or "755 ft". */
export function formatShortDistance(m: number | null, units: Units): string {
  if (m === null || !Number.isFinite(m)) return '–';
  return units === 'imperial' ? `${groupedFixed(Math.round(metresToFeet(m)))} ft` : `${groupedFixed(Math.round(m))} m`;
}

/** A route-length distance for people, e.g. "12.4 km" or "7.7 mi". */
export function formatLongDistance(m: number | null, units: Units): string {
  if (m === null || !Number.isFinite(m)) return '–';
  return units === 'imperial' ? `${metresToMiles(m).toFixed(1)} mi` : `${(m / 1000).toFixed(1)} km`;
}
