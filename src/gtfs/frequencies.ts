// Trip runs per day from frequencies.txt, by the GTFS Schedule rule: a frequency row starts a trip at
// start_time + k*headway_secs for every k with that time before end_time. exact_times=1 means exactly
// those times; exact_times=0 gives the same count but only nominally (the schedule is headway-based).

import type { Feed, Frequency } from './types.js';
import { servicesOn } from './calendar.js';

export interface TripRuns {
  count: number; // runs of the trip in a day (1 for a trip without frequencies)
  nominal: number; // of count, how many come from exact_times=0 rows
}

/** Runs started by one frequency row. */
export function runsOfFrequency(f: Pick<Frequency, 'startS' | 'endS' | 'headwayS'>): number {
  if (!(f.headwayS > 0) || !(f.endS > f.startS)) return 0;
  return Math.ceil((f.endS - f.startS) / f.headwayS);
}

/** Runs per day of every trip that has frequencies.txt rows (trips without rows run once). */
export function tripRunsPerDay(frequencies: Frequency[]): Map<string, TripRuns> {
  const out = new Map<string, TripRuns>();
  for (const f of frequencies) {
    const n = runsOfFrequency(f);
    let r = out.get(f.tripId);
    if (!r) out.set(f.tripId, (r = { count: 0, nominal: 0 }));
    r.count += n;
    if (f.exactTimes === 0) r.nominal += n;
  }
  return out;
}

/**
 * Trip runs a day per service_id, frequencies expanded (a trip without frequencies.txt rows runs once):
 * what the analysis date's rule weighs. `eachTrip` calls `visit` with every trip to count.
 */
export function runsPerService(
  frequencies: Frequency[],
  eachTrip: (visit: (tripId: string, serviceId: string) => void) => void,
): Map<string, number> {
  const runs = tripRunsPerDay(frequencies);
  const out = new Map<string, number>();
  eachTrip((tripId, serviceId) => out.set(serviceId, (out.get(serviceId) ?? 0) + (runs.get(tripId)?.count ?? 1)));
  return out;
}

/** The runs on date (YYYY-MM-DD) of every trip whose service runs that day, frequencies expanded. */
export function tripInstancesOnDate(
  feed: Pick<Feed, 'trips' | 'calendar' | 'calendarDates' | 'frequencies'>,
  date: string,
): Map<string, TripRuns> {
  const on = servicesOn(feed, date);
  const freq = tripRunsPerDay(feed.frequencies);
  const out = new Map<string, TripRuns>();
  for (const t of feed.trips.values()) {
    if (!on.has(t.serviceId)) continue;
    const r = freq.get(t.id);
    if (r) {
      if (r.count > 0) out.set(t.id, { count: r.count, nominal: r.nominal });
    } else {
      out.set(t.id, { count: 1, nominal: 0 });
    }
  }
  return out;
}
