// What a GTFS-Realtime archive tells the model, per pattern: the observed values that replace the
// handbook defaults (lost time per stop, cruise speed, the share of trips that stopped at each stop).

export interface ObservedPattern {
  patternId: string;
  tripsObserved: number; // trip instances matched to this pattern
  meanDwellS: number | null; // observed dwell at stops where the bus stopped
  lostTimePerStopS: number | null; // dwellFixedS + stopLossS when both were observed (the model takes the two parts separately)
  cruiseSpeedMps: number | null;
  /** Share of observed trips that stopped at each stop of the pattern (index = stop position), null where too few data. */
  stopShare: (number | null)[];
  /** Observed median run time per gap, seconds (index = gap position), null where too few data. */
  gapRunTimeS: (number | null)[];
  /** Optional detail (filled by observeArchive): median dwell per stop where the bus stopped, null where too few data. */
  stopDwellS?: (number | null)[];
  /** Optional: trips with a stopped/passed verdict per stop (the denominators of stopShare). */
  stopsObserved?: number[];
  /** The fixed part of dwell (a low quantile of observed dwells, standing for door time), seconds; null where too few dwells. */
  dwellFixedS: number | null;
  /** Braking + accelerating + re-entry loss per served stop fitted from run times, seconds; null when the fit failed or was rejected. */
  stopLossS: number | null;
  /** Optional: how many (trip, gap) run times the cruise-speed fit used. */
  gapsFitted?: number;
}

export interface ObservedData {
  source: string; // archive path
  snapshotsRead: number;
  snapshotsSkipped: number; // DIFFERENTIAL, undecodable, other feed version
  tripsMatched: number;
  tripsUnmatched: number;
  byPattern: Map<string, ObservedPattern>;
  warnings: import('../common/warnings.js').FeedWarning[];
  /** Optional: first and last header timestamps used, POSIX seconds (null when none). */
  firstTimestampS?: number | null;
  lastTimestampS?: number | null;
}
