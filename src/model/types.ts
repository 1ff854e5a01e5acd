// The model's vocabulary: where a demand, a lost time or a parameter came from, why a stop is held fixed,
// and what a realtime archive said about a pattern. The model produces these; the audit, the what-if and
// the reports carry them on, so they live here, below every stage that names them.

export type FixedReason = '' | 'terminal' | 'timepoint' | 'transfer' | 'station' | 'keep';
export type DemandSource = 'observed' | 'land-use' | 'assumed'; // observed = from a ridership file; land-use = the assumed riders placed by a land-use layer's people
export type LostTimeSource = 'default' | 'observed'; // observed = from a GTFS-Realtime archive, in part or whole
/** The parts of the lost time per stop that came from a realtime archive. */
export type ObservedLostTimePart = 'door_time' | 'stop_loss';

/** What a realtime archive said about one pattern, whether or not each value was used (null: not observed). */
export interface ObservedFigures {
  tripsObserved: number;
  dwellS: number | null; // mean observed dwell where the bus stopped, boarding included
  doorTimeS: number | null; // the fixed part of dwell (a low quantile of the observed dwells)
  stopLossS: number | null; // braking + accelerating + re-entry per stop served, fitted from run times
  cruiseSpeedMps: number | null; // fitted with the stop loss
  stopShare: number | null; // mean observed share of trips stopping, over intermediate stops with a share
  lostTimeParts: ObservedLostTimePart[]; // which observed parts the lost time per stop uses
}
export type SourceLabel = 'C' | 'S' | 'M' | 'D' | 'user' | 'estimated' | 'observed';

export interface ParamValue {
  value: number | string | null;
  source: SourceLabel;
  note: string; // where the default comes from, in a few words
}

/** Parameters used, by the names of DESIGN.md section 4 (walk_speed_mps, walk_weight, ...). */
export type ParamsReport = Record<string, ParamValue>;
