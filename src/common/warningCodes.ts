// The closed table of warning codes: every recoverable oddity a run counts (WarningSink), with a title, the
// explanation shown in summary.json and on the page ({name} slots are filled with the values of the run),
// and whether `stopspan check` counts it as a dangling reference. WarningSink.add takes only a code of this
// table, so a new warning cannot be raised without its text; the README's warning list is tested against it.

export interface WarningEntry {
  title: string;
  explanation: string; // one line for people; {name} is filled from the values given where it is raised
  check: boolean; // counted by `stopspan check` under dangling-reference (the reader dropped rows for an id that points nowhere)
}

export const WARNINGS = {
  'download-cache-unusable': {
    title: 'Download cache not used',
    explanation: 'the download cache folder could not be written, so the feed was downloaded without keeping a copy',
    check: false,
  },
  'unsafe-zip-path': {
    title: 'Unsafe path in the zip',
    explanation: 'zip entries with an absolute or ../ path were ignored',
    check: false,
  },
  'padded-values': { title: 'Values padded with spaces', explanation: 'values padded with spaces were trimmed', check: false },
  'stray-quotes': {
    title: 'Quotes inside unquoted values',
    explanation: 'quotes inside unquoted values were read as literal characters',
    check: false,
  },
  'short-rows': {
    title: 'Rows short of the header',
    explanation: 'rows with fewer fields than the header (missing fields read as blank)',
    check: false,
  },
  'long-rows': {
    title: 'Rows longer than the header',
    explanation: 'rows with more fields than the header (extra fields ignored)',
    check: false,
  },
  'invalid-utf8': { title: 'Invalid UTF-8', explanation: 'invalid UTF-8 byte sequences were replaced with U+FFFD', check: false },
  'empty-table': {
    title: 'Empty optional table',
    explanation: 'optional tables with no header (zero bytes, or only a byte-order mark or blank lines) were read as absent',
    check: false,
  },
  'duplicate-route-id': { title: 'Repeated route_id', explanation: 'repeated route_id rows ignored (first kept)', check: false },
  'duplicate-stop-id': { title: 'Repeated stop_id', explanation: 'repeated stop_id rows ignored (first kept)', check: false },
  'calendar-end-before-start': {
    title: 'Calendar ends before it starts',
    explanation: 'calendar.txt rows whose end_date is before their start_date (the service runs on no date they cover)',
    check: false,
  },
  'trip-unknown-route': {
    title: 'Trip on an unknown route',
    explanation: 'trips whose route_id is not in routes.txt were dropped',
    check: true,
  },
  'duplicate-trip-id': { title: 'Repeated trip_id', explanation: 'repeated trip_id rows ignored (first kept)', check: false },
  'frequency-empty-window': {
    title: 'Empty frequency window',
    explanation: 'frequencies rows whose end_time is not after start_time run no trips',
    check: false,
  },
  'blank-direction-id': {
    title: 'Blank direction_id',
    explanation: 'trips with a blank direction_id (patterns are keyed on route and stops alone)',
    check: false,
  },
  'trip-unknown-service': {
    title: 'Trip on an unknown service',
    explanation: 'trips whose service_id is in neither calendar.txt nor calendar_dates.txt (they never run)',
    check: true,
  },
  'trip-without-shape': {
    title: 'Trip without a shape',
    explanation: 'trips without a shape_id (distances fall back to stop positions)',
    check: false,
  },
  'stop-time-at-station': {
    title: 'Stop time at a station',
    explanation: 'stop_times that reference a station (location_type 1) instead of a stop',
    check: false,
  },
  'stop-times-not-grouped': {
    title: 'stop_times not grouped by trip',
    explanation: "stop_times.txt rows are not grouped by trip: each trip's rows were gathered from the whole table (more memory)",
    check: false,
  },
  'repeated-stop-sequence': {
    title: 'Repeated stop_sequence',
    explanation: 'stop_times rows repeating a stop_sequence within a trip were dropped',
    check: false,
  },
  'trip-end-without-time': { title: 'Trip end without a time', explanation: 'trips whose first or last stop has no time', check: false },
  'trip-without-stop-times': {
    title: 'Trip without stop_times',
    explanation: 'kept trips with no stop_times rows were dropped',
    check: false,
  },
  'shape-not-found': { title: 'Shape not in shapes.txt', explanation: 'shape_id used by trips but absent from shapes.txt', check: false },
  'trip-too-short': {
    title: 'Trip with fewer than two stops',
    explanation: 'trip with fewer than two stop_times left out of the patterns',
    check: false,
  },
  'unknown-shape': {
    title: 'Trip names an unknown shape',
    explanation: 'trip names a shape_id that shapes.txt lacks; straight lines used',
    check: false,
  },
  'shape-zero-length': {
    title: 'Shape of zero length',
    explanation: 'shapes whose points all lie at one place (no length); straight lines used',
    check: false,
  },
  'shape-dist-unit-unknown': {
    title: 'shape_dist_traveled in no known unit',
    explanation: 'shape_dist_traveled matches no known unit; read as {metresPerUnit} m per unit',
    check: false,
  },
  'shape-dist-unit-poor-fit': {
    title: 'shape_dist_traveled unit a poor fit',
    explanation: 'shape_dist_traveled read as {unit}, but shapes are {misfitPct} % off that on the median',
    check: false,
  },
  'shape-dist-unit-per-shape': {
    title: 'Shape in another unit',
    explanation: "shapes whose shape_dist_traveled is in another unit than the feed's {unit}; read in the unit their length fits",
    check: false,
  },
  'shape-dist-mismatch': {
    title: 'shape_dist_traveled off the shape length',
    explanation: 'shape whose shape_dist_traveled range is more than 10 % off its geometric length; measured by projection',
    check: false,
  },
  'distance-backtrack': {
    title: 'shape_dist_traveled decreasing',
    explanation: 'shape_dist_traveled decreases along a trip; the pattern is measured by projection instead',
    check: false,
  },
  'partial-shape-dist': {
    title: 'shape_dist_traveled on some stops only',
    explanation: 'trip with shape_dist_traveled on some stops only; the pattern is measured by projection',
    check: false,
  },
  'pattern-without-shape': {
    title: 'Pattern without a usable shape',
    explanation: 'pattern without a usable shape; distances are straight lines between stops',
    check: false,
  },
  'stop-coordinate-fault': {
    title: 'Stop coordinates faulty',
    explanation: 'stops whose coordinates are zero, out of range or near a pole; left out of distances (placed between their neighbours)',
    check: false,
  },
  'projection-fallback': {
    title: 'Stop matched far along its shape',
    explanation: 'stops with no close match on their shape near the previous stop; the rest of the shape was searched',
    check: false,
  },
  'untimed-trip-end': {
    title: 'Trip end without a time (run times)',
    explanation: 'trip whose first or last stop has no time; its run times are left out',
    check: false,
  },
  'ridership-unknown-stop': {
    title: 'Ridership for an unknown stop',
    explanation: 'ridership rows naming a stop_id the feed does not have were skipped',
    check: false,
  },
  'ridership-unknown-route': {
    title: 'Ridership for an unknown route',
    explanation: 'ridership rows naming a route_id the feed does not have were skipped',
    check: false,
  },
  'ridership-unserved-stop': {
    title: 'Ridership for a stop not served',
    explanation: 'ridership rows for a stop no pattern (of the named route) serves on the analysis date were not used',
    check: false,
  },
  'ridership-stop-missing': {
    title: 'Served stop missing from ridership',
    explanation: 'stops served by a pattern but absent from the ridership file were given zero boardings and alightings',
    check: false,
  },
  'ridership-unbalanced': {
    title: 'Boardings and alightings unbalanced',
    explanation: 'patterns whose boardings and alightings differ by more than 1 %: alightings were scaled to match boardings',
    check: false,
  },
  'ridership-one-sided': {
    title: 'Ridership on one side only',
    explanation:
      'patterns with boardings but no alightings (or the reverse) in the ridership file: the load profile cannot be built, demand set to zero',
    check: false,
  },
  'pattern-too-short': {
    title: 'Pattern with fewer than two stops',
    explanation: 'patterns with fewer than two passenger stops were left out of the model',
    check: false,
  },
  'pattern-short-for-trip': {
    title: 'Pattern shorter than the trips asked',
    explanation:
      "patterns too short to hold the mean trip length asked for (typical for the route type, or mean_trip_length_m): riders' trips were spread over what fits, origins and destinations uniform, a mean of about a third of the pattern",
    check: false,
  },
  'timepoints-not-forced': {
    title: 'Timepoints not held fixed',
    explanation: 'patterns marking most stops as timepoints (or with no timepoint column): timepoints were not treated as fixed',
    check: false,
  },
  'no-observed-stopping': {
    title: 'No observed stop shares',
    explanation: 'stopping_model=observed but no observed stop shares for the pattern: {used} used',
    check: false,
  },
  'observed-overridden-stopping-model': {
    title: 'Set stopping model wins over observed',
    explanation:
      'stopping_model set explicitly ({set}) wins over the stop shares observed in the realtime archive (observed_stop_share in patterns.csv)',
    check: false,
  },
  'observed-overridden-door-time-s': {
    title: 'Set door time wins over observed',
    explanation:
      'door_time_s set explicitly ({set}) wins over the door time (fixed part of dwell) observed in the realtime archive; the observed value per pattern is in patterns.csv',
    check: false,
  },
  'observed-overridden-cruise-speed-mps': {
    title: 'Set cruise speed wins over observed',
    explanation:
      'cruise_speed_mps set explicitly ({set}) wins over the cruise speed observed in the realtime archive; the observed value per pattern is in patterns.csv',
    check: false,
  },
  'schedule-too-fast': {
    title: 'Schedule faster than plausible',
    explanation:
      "patterns whose schedule is faster than any plausible cruise speed explains, given the stops served, boarding and braking: the route type's typical cruise speed is used (not the highest, which would make the loss per stop largest where the schedule says it is smallest); `stopspan check` reports these schedules as implausible-speed",
    check: false,
  },
  'observed-overridden-stop-loss': {
    title: 'Set loss terms win over observed',
    explanation:
      'parameters set explicitly ({set}) win over the braking, accelerating and re-entry loss per stop observed in the realtime archive; the observed value per pattern is in patterns.csv',
    check: false,
  },
  'mean-trip-from-counts': {
    title: 'mean_trip_length_m not used',
    explanation:
      "mean_trip_length_m {meanTripLengthM} m not used: with a ridership file every pattern's trip lengths come from its counts (its load profile)",
    check: false,
  },
  'bus-model-off-street': {
    title: 'Off-street route audited with the bus model',
    explanation:
      'patterns of subway, rail, ferry or cable routes, audited with the walk-and-ride model built for buses: their stops are spaced for reasons it does not see (track, stations, access by other modes), so read their verdicts and candidates as a screen at most, with parameters of your own',
    check: false,
  },
  'gap-served-by-local': {
    title: 'Wide gap served by a local route',
    explanation:
      'gaps above the band that another route or pattern serves with stops of its own between their ends (a limited-stop pattern beside a local): not flagged wide, no stop proposed',
    check: false,
  },
  'express-stretch': {
    title: 'Express stretch left out',
    explanation:
      "gaps above the band run non-stop at express speed ({stretchM} m or more at the route type's typical cruise speed or faster), or on a route typed express or coach: left out of the spacing verdicts, not flagged wide, no stop proposed",
    check: false,
  },
  'context-station-no-position': {
    title: 'Context station without a position',
    explanation: 'context feed stations without a usable position were left out',
    check: false,
  },
  'context-no-service': {
    title: 'Context feed without service',
    explanation: 'context feeds with no service on the analysis date: their stations were still used as transfer points',
    check: false,
  },
  'candidates-weighed-alone': {
    title: 'Candidates weighed alone',
    explanation:
      'too many candidates on one pattern to rank them as a programme in reasonable time: each candidate is weighed alone, so their figures do not add up; weigh a set together with whatif',
    check: false,
  },
  'realtime-undecodable': {
    title: 'Unreadable realtime file',
    explanation: 'realtime file is truncated, not protobuf or too large; skipped',
    check: false,
  },
  'realtime-differential': {
    title: 'DIFFERENTIAL snapshot',
    explanation: 'DIFFERENTIAL snapshot is unsupported by the GTFS-Realtime spec; skipped',
    check: false,
  },
  'realtime-no-timestamp': {
    title: 'Snapshot without a timestamp',
    explanation: 'snapshot has no header timestamp, so it cannot be ordered; skipped',
    check: false,
  },
  'realtime-reordered': {
    title: 'Snapshots out of name order',
    explanation: 'snapshot files were not in timestamp order; read in header.timestamp order',
    check: false,
  },
  'realtime-no-timezone': {
    title: 'No agency time zone',
    explanation: 'agency_timezone missing or unknown; service days taken in UTC',
    check: false,
  },
  'realtime-pattern-mismatch': {
    title: "Trip's stops differ from its pattern",
    explanation: "trip's stop list differs from its pattern's; trip not used",
    check: false,
  },
  'realtime-trip-without-id': {
    title: 'Trip descriptor without trip_id',
    explanation: 'trip descriptor without trip_id; skipped',
    check: false,
  },
  'realtime-trip-added': { title: 'ADDED trip', explanation: 'ADDED trip has no static pattern; not used', check: false },
  'realtime-trip-not-in-patterns': {
    title: 'Trip in no analysed pattern',
    explanation: 'trip is in the static feed but in no analysed pattern; not used',
    check: false,
  },
  'realtime-trip-unknown': { title: 'Trip not in the static feed', explanation: 'trip_id not in the static feed; not used', check: false },
  'realtime-frequency-no-start-time': {
    title: 'Frequency trip without start_time',
    explanation: 'frequency-based trip without a valid start_time; not used',
    check: false,
  },
  'realtime-frequency-start-mismatch': {
    title: 'start_time fitting no frequency',
    explanation: "start_time fits none of the trip's frequencies; not used",
    check: false,
  },
  'realtime-bad-start-date': { title: 'Malformed start_date', explanation: 'start_date is not YYYYMMDD; not used', check: false },
  'realtime-date-mismatch': {
    title: 'Service not running on start_date',
    explanation: "trip's service does not run on its start_date; not used",
    check: false,
  },
  'realtime-date-unknown': {
    title: 'No service day for a trip',
    explanation: 'no start_date and no service day fits the snapshot time; not used',
    check: false,
  },
  'realtime-other-feed': {
    title: 'Snapshot of another feed',
    explanation: 'no trip of the snapshot is in the static feed (another feed version?); snapshot skipped',
    check: false,
  },
  'realtime-out-of-order': {
    title: 'Report older than one read',
    explanation: 'report older than one already read for the same trip; skipped',
    check: false,
  },
  'realtime-update-unplaced': {
    title: 'StopTimeUpdate matching no stop',
    explanation: 'StopTimeUpdate matches no stop of the trip; skipped',
    check: false,
  },
  'realtime-vehicle-without-trip': {
    title: 'Vehicle position without a trip',
    explanation: 'vehicle position without a trip; skipped',
    check: false,
  },
  'realtime-vehicle-unplaced': {
    title: 'Vehicle position at no stop of its trip',
    explanation: 'vehicle position names no stop of its trip; skipped',
    check: false,
  },
  'realtime-implausible-run-time': {
    title: 'Implausible observed run time',
    explanation: 'observed gap run time not positive or faster than {maxMps} m/s; dropped',
    check: false,
  },
  'realtime-predicted-only': {
    title: 'Prediction last reported',
    explanation: 'arrival or departure last reported while still in the future (a prediction); {use}',
    check: false,
  },
  'realtime-coarse-polling': {
    title: 'Coarse vehicle polling',
    explanation:
      '{fromVp} of {all} dwells come from VehiclePositions about {intervalS} s apart: dwells shorter than that can be missed, so those dwells lean long',
    check: false,
  },
  'realtime-fit-failed': {
    title: 'Run-time fit undetermined',
    explanation:
      'observed run times do not determine cruise speed and stop loss (the observed dwell and door time are still used); left unset',
    check: false,
  },
  'realtime-fit-rejected': {
    title: 'Run-time fit rejected',
    explanation:
      'observed run times fit with a negative loss per stop served: the fit is rejected whole, cruise speed and stop loss left unset (the observed dwell and door time are still used)',
    check: false,
  },
  'realtime-share-unidentified': {
    title: 'Stopping share not identified',
    explanation:
      'stopping share left unset at {stops} stops: vehicles were seen before and after them too far apart (over {passMaxGapS} s) to tell a pass from a short dwell',
    check: false,
  },
} as const satisfies Record<string, WarningEntry>;

export type WarningCode = keyof typeof WARNINGS;
