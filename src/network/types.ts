// Route patterns: trips sharing route_id, direction_id and the ordered list of stop_ids, with the
// distance of each stop along the pattern's path and the scheduled run time of each gap.

import type { ShapeDistUnitFit } from './shapeDistUnit.js';
import type { FeedWarning } from '../common/warnings.js';

export type DistanceSource = 'shape_dist_traveled' | 'shape_projection' | 'great_circle';

export interface Pattern {
  id: string; // stable and readable: `${route_id}:${direction_id}:${n}`, n = 1.. by trips per day, descending
  routeId: string;
  directionId: number; // -1 when blank in the feed
  headsign: string; // most common trip_headsign
  shapeId: string; // representative shape (most common among its trips), '' when none
  tripIds: string[]; // trips of the pattern running on the analysis date
  tripsPerDay: number; // on the analysis date, frequencies expanded
  nominalFrequencyTrips: number; // of tripsPerDay, how many come from exact_times=0 (nominal) frequencies
  stopIdx: number[]; // indices into Feed.stops, in order
  distAlongM: number[]; // metres from the first stop, non-decreasing, distAlongM[0] = 0
  offsetFromShapeM: (number | null)[]; // distance of each stop from its projected point; null without a shape
  distanceSource: DistanceSource;
  lengthM: number; // distAlongM[last]
  passengerStop: boolean[]; // false where pickup_type=1 and drop_off_type=1 on the representative trip
  timepoint: boolean[];
  /** Scheduled run time per gap (length stopIdx.length - 1), median over the pattern's trips, seconds. */
  gapRunTimeS: number[];
  gapTimeInterpolated: boolean[]; // true where a blank time was interpolated by distance
  runTimeS: number; // first departure to last arrival, median over trips
  /** Dwell scheduled at each stop (departure - arrival), median over trips, seconds. */
  scheduledDwellS: number[];
  /** Shape path (lon, lat pairs) for maps, simplified (Douglas-Peucker, about 5 m); the stops' coordinates without a shape. */
  path: [number, number][];
}

export interface PatternSet {
  date: string; // YYYY-MM-DD analysis date
  patterns: Pattern[];
  /** For each stop index, the route_ids of the patterns serving it on the analysis date (transfer detection). */
  routesAtStop: Map<number, Set<string>>;
  /** The inferred unit of shape_dist_traveled; null when the shapes in use carry none. */
  shapeDistUnit?: ShapeDistUnitFit | null;
  /** Trips whose shape_dist_traveled decreases (the check stage reports 'distance-backtrack'). */
  distanceBacktracks?: DistanceBacktrack[];
  /** The network stage's warnings, when buildPatterns was given no WarningSink of the caller's. */
  warnings?: FeedWarning[];
}

/** A trip whose shape_dist_traveled decreases at stop index stopIndex; its pattern fell back to projection. */
export interface DistanceBacktrack {
  patternId: string;
  tripId: string;
  stopIndex: number;
}
