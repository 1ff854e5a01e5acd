// Service calendar and frequencies by the GTFS Schedule rules, on hand-built tables whose answers are
// worked out by hand beside each check, and checked against the weekdays of a calendar outside the code.

import { describe, expect, it } from 'vitest';
import { chooseAnalysisDate, defaultAnalysisDate, serviceRange, servicesOn, weekdayOf } from '../../src/gtfs/calendar.js';
import { runsOfFrequency, tripInstancesOnDate, tripRunsPerDay } from '../../src/gtfs/frequencies.js';
import type { CalendarDate, CalendarRow, Frequency, Trip } from '../../src/gtfs/types.js';

const WEEKDAYS: CalendarRow['days'] = [true, true, true, true, true, false, false];
const cal = (serviceId: string, days: CalendarRow['days'], start: string, end: string): CalendarRow => ({ serviceId, days, start, end });
const ex = (serviceId: string, date: string, exceptionType: 1 | 2): CalendarDate => ({ serviceId, date, exceptionType });
const trip = (id: string, serviceId: string): Trip => ({ id, routeId: 'R1', serviceId, directionId: 0, headsign: '', shapeId: '' });

describe('servicesOn', () => {
  const feed = {
    calendar: [
      cal('WK', WEEKDAYS, '20260907', '20260930'),
      cal('SUN', [false, false, false, false, false, false, true], '20260901', '20261231'),
    ],
    calendarDates: [ex('WK', '20260914', 2), ex('HOL', '20260914', 1), ex('WK', '20260912', 1)],
  };
  it('runs a calendar row on its weekdays from start_date to end_date inclusive', () => {
    // [C, GTFS Schedule reference, calendar.txt: start_date and end_date are included in the interval]
    expect(servicesOn(feed, '2026-09-07')).toEqual(new Set(['WK'])); // a Monday, the first day
    expect(servicesOn(feed, '2026-09-30')).toEqual(new Set(['WK'])); // a Wednesday, the last day
    expect(servicesOn(feed, '2026-10-01')).toEqual(new Set());
    expect(servicesOn(feed, '2026-09-06')).toEqual(new Set(['SUN']));
  });
  it('applies calendar_dates: 1 adds the service on that date, 2 removes it', () => {
    // [C, GTFS Schedule reference, calendar_dates.txt exception_type 1 added, 2 removed]
    expect(servicesOn(feed, '2026-09-14')).toEqual(new Set(['HOL']));
    expect(servicesOn(feed, '2026-09-12')).toEqual(new Set(['WK'])); // a Saturday added by exception
  });
  it('rejects a date that does not exist', () => {
    expect(() => servicesOn(feed, '2026-02-29')).toThrow(/invalid option date/);
  });
  it('numbers weekdays as the calendar does', () => {
    // JavaScript's Date (an implementation of the proleptic Gregorian calendar) as the outside reference:
    // 2026-09-07 is a Monday, 2027-01-02 a Saturday [C, ECMAScript Date; also any printed 2026 calendar]
    expect(weekdayOf('20260907')).toBe(0);
    expect(weekdayOf('20270102')).toBe(5);
    expect(weekdayOf('20260906')).toBe(6);
  });
});

describe('serviceRange and defaultAnalysisDate', () => {
  it('spans calendar rows and added dates, not removed ones', () => {
    const feed = {
      calendar: [cal('WK', WEEKDAYS, '20260907', '20260930')],
      calendarDates: [ex('X', '20261003', 1), ex('WK', '20261231', 2)],
    };
    expect(serviceRange(feed)).toEqual({ start: '2026-09-07', end: '2026-10-03' });
    expect(serviceRange({ calendar: [], calendarDates: [] })).toBeNull();
  });
  it('picks the weekday with the most trip runs, the earliest on a tie, never a weekend day', () => {
    const feed = {
      calendar: [cal('WK', WEEKDAYS, '20260907', '20260930')],
      calendarDates: [ex('BIG', '20260912', 1), ex('MID', '20260917', 1), ex('MID', '20260922', 1)],
    };
    const runs = new Map([
      ['WK', 10],
      ['BIG', 100], // a Saturday: ignored
      ['MID', 5],
    ]);
    expect(defaultAnalysisDate(feed, runs)).toBe('2026-09-17'); // Thursday: 15, tied with Tuesday 22nd, earlier
    expect(defaultAnalysisDate(feed, new Map([['BIG', 3]]))).toBeNull();
  });
});

describe('frequencies', () => {
  it('start trips at start_time + k*headway_secs while before end_time', () => {
    // [C, GTFS Schedule reference, frequencies.txt]: 07:00-08:00 every 600 s -> 07:00, 07:10 ... 07:50 = 6 [D]
    expect(runsOfFrequency({ startS: 7 * 3600, endS: 8 * 3600, headwayS: 600 })).toBe(6);
    // 07:00-07:55 every 600 s: 07:00 ... 07:50 = 6; 07:00-07:50: 07:00 ... 07:40 = 5 [D]
    expect(runsOfFrequency({ startS: 7 * 3600, endS: 7 * 3600 + 55 * 60, headwayS: 600 })).toBe(6);
    expect(runsOfFrequency({ startS: 7 * 3600, endS: 7 * 3600 + 50 * 60, headwayS: 600 })).toBe(5);
    expect(runsOfFrequency({ startS: 100, endS: 100, headwayS: 60 })).toBe(0);
  });
  it('count exact_times=0 runs as nominal', () => {
    const freq: Frequency[] = [
      { tripId: 'TF', startS: 25200, endS: 28800, headwayS: 600, exactTimes: 1 },
      { tripId: 'TF', startS: 57600, endS: 59400, headwayS: 900, exactTimes: 0 },
    ];
    expect(tripRunsPerDay(freq).get('TF')).toEqual({ count: 8, nominal: 2 });
    const feed = {
      trips: new Map([
        ['TF', trip('TF', 'WK')],
        ['T1', trip('T1', 'WK')],
        ['T2', trip('T2', 'SAT')],
      ]),
      calendar: [cal('WK', WEEKDAYS, '20260907', '20260930')],
      calendarDates: [],
      frequencies: freq,
    };
    expect(tripInstancesOnDate(feed, '2026-09-16')).toEqual(
      new Map([
        ['TF', { count: 8, nominal: 2 }],
        ['T1', { count: 1, nominal: 0 }],
      ]),
    );
  });
});

describe('chooseAnalysisDate: one rule for every command', () => {
  // weekday service through October 2026; 2026-10-14 is a Wednesday, 2026-10-17 a Saturday, 2026-10-19 a
  // Monday [C, ECMAScript Date; any printed 2026 calendar]
  const feed = { calendar: [cal('WK', WEEKDAYS, '20261001', '20261031')], calendarDates: [ex('WK', '20261015', 2)] };
  const runs = new Map([['WK', 40]]);
  it('analyses --date when something runs on it, and refuses one on which nothing runs', () => {
    expect(chooseAnalysisDate(feed, runs, { date: '2026-10-14', today: '2026-10-01' })).toMatchObject({
      date: '2026-10-14',
      basis: 'asked',
    });
    expect(() => chooseAnalysisDate(feed, runs, { date: '2030-01-01' })).toThrow(/no trip runs on 2030-01-01/);
    expect(() => chooseAnalysisDate(feed, runs, { date: '2026-10-15' })).toThrow(/no trip runs/); // removed by calendar_dates [C, GTFS Schedule reference, exception_type 2]
  });
  it("analyses the run date's service, else the first day with service in the week after it, else none", () => {
    expect(chooseAnalysisDate(feed, runs, { today: '2026-10-14' })).toMatchObject({ date: '2026-10-14', basis: 'run-date' });
    const sat = chooseAnalysisDate(feed, runs, { today: '2026-10-17' });
    expect(sat).toMatchObject({ date: '2026-10-19', basis: 'next-service-day' });
    expect(sat.because).toMatch(/after the run date 2026-10-17/);
    expect(chooseAnalysisDate(feed, runs, { today: '2026-10-15' }).date).toBe('2026-10-16'); // the removed Thursday
    const late = chooseAnalysisDate(feed, runs, { today: '2026-11-02' });
    expect(late).toMatchObject({ date: null, basis: 'none' });
    expect(late.because).toMatch(/2026-11-02 or in the 7 days after it/);
    // a Saturday that is the service's last day: the week after it has nothing
    expect(chooseAnalysisDate(feed, runs, { today: '2026-10-31' }).date).toBeNull();
  });
  it('without either, the default analysis date (frequencies expanded by the caller)', () => {
    expect(chooseAnalysisDate(feed, runs)).toMatchObject({ date: '2026-10-01', basis: 'busiest-weekday' });
    expect(chooseAnalysisDate({ calendar: [], calendarDates: [] }, runs)).toMatchObject({ date: null, basis: 'none' });
  });
});
