// Observed data from GTFS-Realtime archives: re-exports only.
export * from './types.js';
export { readArchive, scanHeader, maybeGunzip, type Snapshot, type ArchiveStats, type ReadArchiveOptions } from './archive.js';
export {
  resolveStopTimeUpdates,
  hasField,
  EVENT_UNKNOWN,
  EVENT_EXPLICIT,
  EVENT_PROPAGATED,
  EVENT_SKIPPED,
  type TripSchedule,
  type StopEvents,
} from './resolveStopTimeUpdates.js';
export {
  TripInstanceState,
  observeTripUpdate,
  observeVehiclePosition,
  stopVerdict,
  gapRunTime,
  type StopVerdict,
  type VerdictOptions,
} from './observe.js';
export { RunTimeFit } from './fitRunTimes.js';
export { observeArchive, type ObserveArchiveOptions } from './calibrate.js';
export { serviceRunsOn, serviceDayOriginS, localDate, addDays, parseGtfsTime } from './serviceDay.js';
