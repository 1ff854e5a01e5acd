// What a GTFS-Realtime archive tells the model, per pattern: the observed values that replace the
// handbook defaults (lost time per stop, cruise speed, the share of trips that stopped at each stop).

export interface ObservedPattern {
  patternId: string;
  tripsObserved: number; // trip instances matched to this pattern
  meanDwellS: number | null; // observed dwell at stops where the bus stopped
  lostTimePerStopS: number | null; // dwell fixed part + braking/accelerating, explaining observed run times
  cruiseSpeedMps: number | null;
  /** Share of observed trips that stopped at each stop of the pattern (index = stop position), null where too few data. */
  stopShare: (number | null)[];
  /** Observed median run time per gap, seconds (index = gap position), null where too few data. */
  gapRunTimeS: (number | null)[];
}

export interface ObservedData {
  source: string; // archive path
  snapshotsRead: number;
  snapshotsSkipped: number; // DIFFERENTIAL, undecodable, other feed version
  tripsMatched: number;
  tripsUnmatched: number;
  byPattern: Map<string, ObservedPattern>;
  warnings: import('../common/warnings.js').FeedWarning[];
}
