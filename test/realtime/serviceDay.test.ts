// Service-day arithmetic: the origin GTFS times count from, and which services run on a date.

import { describe, expect, it } from 'vitest';
import { serviceDayOriginS, serviceRunsOn, localDate, addDays, parseGtfsTime } from '../../src/realtime/index.js';

describe('serviceDayOriginS', () => {
  it('is local midnight on an ordinary day', () => {
    // America/New_York is UTC-5 in November (EST) [common practice: tz database]
    expect(serviceDayOriginS('20261104', 'America/New_York')).toBe(Date.UTC(2026, 10, 4, 5) / 1000);
    expect(serviceDayOriginS('20261104', 'Etc/GMT-1')).toBe(Date.UTC(2026, 10, 3, 23) / 1000);
  });

  it('is noon minus 12 h, not midnight, on the day daylight saving time starts', () => {
    // GTFS Schedule reference, stop_times.arrival_time: times are measured from "noon minus 12h" of the
    // service day [C]. 2026-03-08 in New York: noon EDT (UTC-4) is 16:00 UTC, minus 12 h is 04:00 UTC.
    expect(serviceDayOriginS('20260308', 'America/New_York')).toBe(Date.UTC(2026, 2, 8, 4) / 1000);
  });
});

describe('serviceRunsOn', () => {
  const calendar = [
    {
      serviceId: 'WKDY',
      days: [true, true, true, true, true, false, false] as [boolean, boolean, boolean, boolean, boolean, boolean, boolean],
      start: '20261102',
      end: '20261130',
    },
  ];
  const dates = [
    { serviceId: 'WKDY', date: '20261111', exceptionType: 2 as const },
    { serviceId: 'XTRA', date: '20261107', exceptionType: 1 as const },
  ];
  it('follows the calendar, its inclusive end date and calendar_dates exceptions (GTFS Schedule reference [C])', () => {
    expect(serviceRunsOn('WKDY', '20261104', calendar, dates)).toBe(true); // a Wednesday
    expect(serviceRunsOn('WKDY', '20261107', calendar, dates)).toBe(false); // a Saturday
    expect(serviceRunsOn('WKDY', '20261130', calendar, dates)).toBe(true); // end_date is inclusive
    expect(serviceRunsOn('WKDY', '20261201', calendar, dates)).toBe(false);
    expect(serviceRunsOn('WKDY', '20261111', calendar, dates)).toBe(false); // removed by exception_type 2
    expect(serviceRunsOn('XTRA', '20261107', calendar, dates)).toBe(true); // calendar_dates alone
  });
});

describe('date and time helpers', () => {
  it('gives the local date of an instant, steps dates and reads times past 24:00', () => {
    expect(localDate(Date.UTC(2026, 10, 3, 23, 30) / 1000, 'Etc/GMT-1')).toBe('20261104');
    expect(addDays('20261101', -1)).toBe('20261031');
    expect(parseGtfsTime('25:10:05')).toBe(25 * 3600 + 605);
    expect(parseGtfsTime('8:61:00')).toBe(null);
    // the feed reader's bound of 168 hours, and its digits-only hours
    expect(parseGtfsTime('168:00:00')).toBe(168 * 3600);
    expect(parseGtfsTime('500:00:00')).toBe(null); // past 168 h (the old pattern took up to 999 h)
    expect(parseGtfsTime('+8:00:00')).toBe(null);
  });
});
