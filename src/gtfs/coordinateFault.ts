// The one rule for coordinates that cannot be a stop's: not numbers, out of range, zero (a placeholder:
// the equator or the prime meridian exactly), or within five degrees of a pole, where no transit stop
// stands (the northernmost and southernmost towns with bus service lie below 79 degrees). Feed checks
// report such stops as 'coordinate-fault'; the pattern builder leaves them out of distances.

/** Latitudes beyond this (either sign) are taken as a fault: 85 degrees. */
export const MAX_STOP_LAT_DEG = 85;

/** Why (lat, lon) cannot be a stop's position ('' when it can). */
export function coordinateFault(lat: number, lon: number): string {
  if (!Number.isFinite(lat) || !Number.isFinite(lon)) return 'missing or not a number';
  if (Math.abs(lat) > 90 || Math.abs(lon) > 180) return 'out of range';
  if (lat === 0 || lon === 0) return 'zero';
  if (Math.abs(lat) > MAX_STOP_LAT_DEG) return 'near a pole';
  return '';
}
