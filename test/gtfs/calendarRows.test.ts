// One rule for calendar rows, whichever feed they come from: a bad calendar.txt or calendar_dates.txt row in
// a context feed is refused with the same error as in the audited feed (file, line, column, value), where
// the context reader used to read a blank weekday as 0; an empty optional calendar table reads as absent in
// both, where the context reader refused it. The basic Vellmoor fixture with one table edited.
import { afterAll, describe, expect, it } from 'vitest';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { readContextFeed } from '../../src/gtfs/readContext.js';
import { WarningSink } from '../../src/common/warnings.js';
import { rejected } from '../helpers/errors.js';
import { cleanupCopies, feedCopy } from './feedCopy.js';

afterAll(cleanupCopies);

const HEAD = 'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date';

describe('calendar rows in a context feed', () => {
  const cases: [string, Record<string, string>][] = [
    // [C, GTFS Schedule reference, calendar.txt: monday..sunday are required, 0 or 1; a blank is not 0]
    ['a blank weekday', { 'calendar.txt': `${HEAD}\nWK,1,,1,1,1,0,0,20260907,20260930\n` }],
    ['a weekday of 2', { 'calendar.txt': `${HEAD}\nWK,1,1,2,1,1,0,0,20260907,20260930\n` }],
    // [C, GTFS Schedule reference: dates are YYYYMMDD; 20260931 does not exist]
    ['a date that does not exist', { 'calendar.txt': `${HEAD}\nWK,1,1,1,1,1,0,0,20260907,20260931\n` }],
    ['a blank service_id', { 'calendar.txt': `${HEAD}\n,1,1,1,1,1,0,0,20260907,20260930\n` }],
    // [C, GTFS Schedule reference, calendar_dates.txt exception_type: 1 added, 2 removed]
    ['an exception_type of 3', { 'calendar_dates.txt': 'service_id,date,exception_type\nWK,20260914,3\n' }],
  ];
  for (const [what, change] of cases) {
    it(`refuses ${what} as the audited feed's reader does`, async () => {
      const dir = feedCopy(change);
      const main = await rejected(readFeed(dir, { date: '2026-09-14' }));
      const context = await rejected(readContextFeed(dir, { date: '2026-09-14', warnings: new WarningSink(), label: 'rail' }));
      expect(context.code).toBe(main.code);
      expect(context.message).toBe(`context feed ${dir}: ${main.message}`);
      expect(context.context.file).toBe(`rail/${main.context.file}`);
      expect({ line: context.context.line, column: context.context.column, value: context.context.value }).toEqual({
        line: main.context.line,
        column: main.context.column,
        value: main.context.value,
      });
      // the one line a user reads differs only by naming the context feed
      expect(context.oneLine()).toBe(
        main.oneLine().replace(`${main.context.file}:`, `rail/${main.context.file}:`).replace(': ', `: context feed ${dir}: `),
      );
    });
  }

  it("reads an empty calendar_dates.txt as absent, counted, as the audited feed's reader does", async () => {
    const dir = feedCopy({ 'calendar_dates.txt': '' });
    const main = await readFeed(dir, { date: '2026-09-15' });
    expect(main.warnings.find((w) => w.code === 'empty-table')?.examples).toEqual(['calendar_dates.txt']);
    const warnings = new WarningSink();
    const c = await readContextFeed(dir, { date: '2026-09-15', warnings, label: 'rail' });
    expect(c.servicesOnDate).toBeGreaterThan(0);
    expect(warnings.list().find((w) => w.code === 'empty-table')?.examples).toEqual(['rail calendar_dates.txt']);
  });

  it('counts a calendar row that ends before it starts, naming the context feed', async () => {
    const dir = feedCopy({ 'calendar.txt': `${HEAD}\nWK,1,1,1,1,1,0,0,20260907,20260930\nOLD,1,1,1,1,1,0,0,20260930,20260907\n` });
    const warnings = new WarningSink();
    const c = await readContextFeed(dir, { date: '2026-09-15', warnings, label: 'rail' });
    expect(c.servicesOnDate).toBeGreaterThan(0);
    expect(warnings.list().find((w) => w.code === 'calendar-end-before-start')?.examples).toEqual(['rail calendar.txt:3']);
  });
});
