// The unit of shape_dist_traveled. GTFS gives it no unit, only the same one in shapes.txt and
// stop_times.txt, so the unit is inferred from the ratio of a shape's geometric length (metres) to its
// shape_dist_traveled range, and converted to metres. Also finds distances that decrease along a trip.

export type ShapeDistUnit = 'm' | 'km' | 'ft' | 'mi' | 'scale';

/** Metres per unit for the units recognised by name. */
export const METRES_PER_UNIT: Record<Exclude<ShapeDistUnit, 'scale'>, number> = {
  m: 1,
  km: 1000,
  ft: 0.3048, // international foot, exact by definition
  mi: 1609.344, // international mile, exact by definition
};

export interface ShapeDistUnitFit {
  unit: ShapeDistUnit;
  /** Multiply shape_dist_traveled by this to get metres. */
  metresPerUnit: number;
  /** Observed metres per feed unit (geometric length / dist range), median over the shapes used. */
  observedMetresPerUnit: number;
  /** Relative difference between observed and the named unit's factor (0 for 'scale'). */
  misfit: number;
  /** True when the fit to a named unit is loose (misfit above goodFit) or no named unit fits. */
  poorFit: boolean;
  /** Shapes with a usable shape_dist_traveled range that entered the fit. */
  shapesUsed: number;
}

export interface ShapeDistUnitOptions {
  /** A named unit within this relative misfit is a good fit. */
  goodFit?: number;
  /** A named unit within this relative misfit is accepted (with a poor-fit flag); beyond it: 'scale'. */
  acceptFit?: number;
}

/**
 * Infers the unit from pairs of (shape_dist_traveled range, geometric length in metres), one per shape.
 * Returns null when no pair has a positive range and length.
 * @example inferShapeDistUnit([{ distRange: 5.2, lengthM: 5230 }]) // { unit: 'km', ... }
 */
export function inferShapeDistUnit(
  samples: { distRange: number; lengthM: number }[],
  options: ShapeDistUnitOptions = {},
): ShapeDistUnitFit | null {
  const { goodFit = 0.03, acceptFit = 0.15 } = options;
  if (!(goodFit >= 0 && acceptFit >= goodFit)) {
    throw new RangeError(
      `inferShapeDistUnit: invalid options goodFit/acceptFit: expected 0 <= goodFit <= acceptFit, got ${goodFit}/${acceptFit}`,
    );
  }
  const ratios: number[] = [];
  for (const { distRange, lengthM } of samples) {
    if (distRange > 0 && lengthM > 0 && Number.isFinite(distRange) && Number.isFinite(lengthM)) ratios.push(lengthM / distRange);
  }
  if (ratios.length === 0) return null;
  ratios.sort((a, b) => a - b);
  const mid = ratios.length >> 1;
  const observed = ratios.length % 2 ? ratios[mid] : (ratios[mid - 1] + ratios[mid]) / 2;
  let best: Exclude<ShapeDistUnit, 'scale'> = 'm';
  let bestMisfit = Infinity;
  for (const [unit, factor] of Object.entries(METRES_PER_UNIT) as [Exclude<ShapeDistUnit, 'scale'>, number][]) {
    // Symmetric on a log scale, expressed as a relative difference.
    const misfit = Math.exp(Math.abs(Math.log(observed / factor))) - 1;
    if (misfit < bestMisfit) {
      bestMisfit = misfit;
      best = unit;
    }
  }
  if (bestMisfit <= acceptFit) {
    return {
      unit: best,
      metresPerUnit: METRES_PER_UNIT[best],
      observedMetresPerUnit: observed,
      misfit: bestMisfit,
      poorFit: bestMisfit > goodFit,
      shapesUsed: ratios.length,
    };
  }
  return { unit: 'scale', metresPerUnit: observed, observedMetresPerUnit: observed, misfit: 0, poorFit: true, shapesUsed: ratios.length };
}

/** Range (last - first) of the finite values of a distance array, or NaN when fewer than two are finite. */
export function distRange(dist: ArrayLike<number>): number {
  let first = NaN;
  let last = NaN;
  let n = 0;
  for (let i = 0; i < dist.length; i++) {
    const v = dist[i];
    if (Number.isFinite(v)) {
      if (n++ === 0) first = v;
      last = v;
    }
  }
  return n >= 2 ? last - first : NaN;
}

/**
 * Index of the first value smaller than the finite value before it (by more than `tolerance`), or -1 when
 * the values never decrease.
 */
export function firstBacktrack(dist: ArrayLike<number>, tolerance = 0): number {
  let prev = -Infinity;
  for (let i = 0; i < dist.length; i++) {
    const v = dist[i];
    if (!Number.isFinite(v)) continue;
    if (v < prev - tolerance) return i;
    prev = v;
  }
  return -1;
}

/** Converts a trip's shape_dist_traveled to metres from its first stop; null when any value is blank. */
export function shapeDistToMetres(dist: ArrayLike<number>, metresPerUnit: number): number[] | null {
  if (dist.length === 0) return [];
  const out: number[] = new Array(dist.length);
  const d0 = dist[0];
  for (let i = 0; i < dist.length; i++) {
    const v = dist[i];
    if (!Number.isFinite(v)) return null;
    out[i] = (v - d0) * metresPerUnit;
  }
  return out;
}
