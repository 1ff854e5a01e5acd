// CSV renderers: the column names of the output contract, RFC 4180 quoting read back by an outside
// parser (csv-parse), formula-injection guarding of text cells only, CRLF records, UTF-8 and the
// optional imperial columns.

import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { StopResult } from '../../src/audit/types.js';
import { candidatesCsv, formatNumber, guardText, patternsCsv, quoteField, renderCsv, stopsCsv } from '../../src/report/csv.js';
import { HOSTILE_NAMES, makeSampleResult } from './sampleResult.js';

const sample = makeSampleResult();

// Column lists of the output contract (DESIGN.md section 5), written out here on purpose.
const PATTERN_HEADER =
  'pattern_id,route_id,route_short_name,direction_id,headsign,shape_id,distance_source,stop_count,length_m,trips_per_day,median_gap_m,mean_gap_m,optimal_spacing_m,band_low_m,band_high_m,close_stops,wide_gaps,optimal_stop_count,pax_min_lost_per_day,demand_source' +
  // the contract's columns first, then the figures behind each pattern's optimum
  ',lost_time_per_stop_s,lost_time_source,cruise_speed_mps,cruise_speed_source,traffic_delay_s,stopping_model,mean_trip_length_m' +
  ',observed_trips,observed_dwell_s,observed_door_time_s,observed_stop_loss_s,observed_cruise_speed_mps,observed_stop_share,lost_time_observed_parts' +
  // what the proposed additions save on the pattern, and removals and additions together
  ',pax_min_additions_per_day,pax_min_at_stake_per_day' +
  // with a land-use layer, the people within a walk of the pattern's stops (empty without one)
  ',people_covered';
const STOP_HEADER =
  'pattern_id,route_id,direction_id,stop_index,stop_id,stop_name,stop_lat,stop_lon,dist_along_m,gap_before_m,gap_after_m,trips_per_day,boardings_per_day,alightings_per_day,verdict,fixed_reason,fixed_note,removal_net_pax_min_per_day,demand_source,optimiser_keeps' +
  // the stop's own verdict and the gaps' beside it, apart
  ',stop_verdict,gap_before_verdict,gap_after_verdict';

/** Reads CSV with csv-parse, the outside reference parser, insisting on CRLF records. */
function readBack(text: string): string[][] {
  return parse(text, { record_delimiter: '\r\n', relax_column_count: false, bom: false }) as string[][];
}

describe('patterns.csv, stops.csv and candidates.csv', () => {
  it('use exactly the column names of the output contract', () => {
    expect(patternsCsv(sample).split('\r\n')[0]).toBe(PATTERN_HEADER);
    expect(stopsCsv(sample).split('\r\n')[0]).toBe(STOP_HEADER);
    const candHeader = readBack(candidatesCsv(sample))[0];
    expect(candHeader.slice(0, 4)).toEqual(['rank', 'action', 'stop_id', 'stop_name']);
    expect(candHeader).toContain('net_pax_min_per_day');
    expect(candHeader).toContain('run_time_saved_per_trip_s');
    expect(candHeader).toContain('vehicle_hours_per_day');
    expect(candHeader).toContain('riders_affected_per_day');
    expect(candHeader.at(-1)).toBe('people_left_uncovered');
    // units in the names: every numeric measure ends in a unit or a per-day rate
    for (const name of candHeader) expect(name).toMatch(/^[a-z_]+$/);
  });

  it('read back with csv-parse equal to what was written, one record per stop row', () => {
    const rows = readBack(stopsCsv(sample));
    expect(rows.length).toBe(sample.stops.length + 1);
    const header = rows[0];
    const col = (n: string): number => header.indexOf(n);
    sample.stops.forEach((s: StopResult, i) => {
      const r = rows[i + 1];
      expect(r.length).toBe(header.length);
      expect(r[col('pattern_id')]).toBe(guardText(s.patternId));
      expect(r[col('stop_id')]).toBe(s.stopId);
      expect(r[col('stop_name')]).toBe(guardText(s.stopName));
      expect(Number(r[col('stop_lat')])).toBeCloseTo(s.stopLat, 6);
      expect(Number(r[col('stop_lon')])).toBeCloseTo(s.stopLon, 6);
      expect(Number(r[col('dist_along_m')])).toBeCloseTo(s.distAlongM, 1);
      expect(r[col('gap_before_m')]).toBe(s.gapBeforeM === null ? '' : String(Math.round(s.gapBeforeM * 10) / 10));
      expect(r[col('verdict')]).toBe(s.verdict);
      expect(r[col('removal_net_pax_min_per_day')]).toBe(
        s.removalNetPaxMinPerDay === null ? '' : String(Math.round(s.removalNetPaxMinPerDay * 10) / 10),
      );
    });
    // the awkward names survive: comma, quotes, newline and non-ASCII text
    const names = rows.slice(1).map((r) => r[col('stop_name')]);
    expect(names).toContain(HOSTILE_NAMES.comma);
    expect(names).toContain(HOSTILE_NAMES.quotes);
    expect(names).toContain(HOSTILE_NAMES.multiline);
    expect(names).toContain(HOSTILE_NAMES.unicode);
    const pat = readBack(patternsCsv(sample));
    expect(pat.length).toBe(sample.patterns.length + 1);
    expect(pat.slice(1).map((r) => r[2])).toEqual(sample.patterns.map((p) => p.routeShortName));
    expect(pat.slice(1).map((r) => r[4])).toEqual(sample.patterns.map((p) => p.headsign));
  });

  it('guards a stop named =HYPERLINK("http://x") and other formula starts, but not negative numbers', () => {
    // OWASP "CSV Injection" guidance [M, from memory]: cells starting with = + - @ tab or CR are run as formulas
    const text = stopsCsv(sample);
    expect(text).toContain(`"'=HYPERLINK(""http://x"")"`); // quote prefix, then RFC 4180 doubled quotes
    expect(text).not.toMatch(/(^|,)"?=HYPERLINK/m);
    expect(text).toContain(`,'-Westbank Steps,`);
    const rows = readBack(text);
    const netCol = rows[0].indexOf('removal_net_pax_min_per_day');
    const negatives = rows
      .slice(1)
      .map((r) => r[netCol])
      .filter((v) => v.startsWith('-'));
    expect(negatives.length).toBeGreaterThan(0); // a plain negative number in a numeric column stays a number
    for (const v of negatives) expect(Number.isFinite(Number(v))).toBe(true);
    expect(guardText('+1 555')).toBe("'+1 555");
    expect(guardText('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(guardText('\tx')).toBe("'\tx");
    expect(guardText('\rx')).toBe("'\rx");
    expect(guardText('Mill Lane')).toBe('Mill Lane');
    // the warnings' examples are not in the CSVs, but candidate names built from stop names are guarded too
    expect(candidatesCsv(sample)).not.toMatch(/(^|,)"?=/m);
  });

  it('quotes fields as RFC 4180 section 2 asks and ends every record with CRLF', () => {
    // RFC 4180 section 2, rules 6 and 7 [C]: fields with commas, quotes or line breaks are enclosed in
    // double quotes, and a double quote inside is escaped by preceding it with another double quote.
    expect(quoteField('a,b')).toBe('"a,b"');
    expect(quoteField('say "hi"')).toBe('"say ""hi"""');
    expect(quoteField('two\nlines')).toBe('"two\nlines"');
    expect(quoteField('plain')).toBe('plain');
    const text = patternsCsv(sample);
    expect(text.endsWith('\r\n')).toBe(true);
    // outside quoted fields there is no bare LF
    const unquoted = text.replace(/"(?:[^"]|"")*"/g, '');
    expect(unquoted.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
    expect(Buffer.from(stopsCsv(sample), 'utf8').toString('utf8')).toContain('Brückenplatz Café');
    expect(stopsCsv(sample).charCodeAt(0)).not.toBe(0xfeff); // no byte-order mark
  });

  it('reads back any text exactly (guarded) with csv-parse, for arbitrary strings', () => {
    const cols = [
      { name: 'id', kind: 'text' as const, get: (r: { a: string; n: number }) => r.a },
      { name: 'value_m', kind: 'number' as const, get: (r: { a: string; n: number }) => r.n },
    ];
    fc.assert(
      fc.property(
        fc.array(fc.record({ a: fc.string({ unit: 'grapheme' }), n: fc.double({ noNaN: true, noDefaultInfinity: true }) }), {
          maxLength: 20,
        }),
        (rows) => {
          const back = readBack(renderCsv(cols, rows));
          expect(back.length).toBe(rows.length + 1);
          rows.forEach((r, i) => {
            expect(back[i + 1][0]).toBe(guardText(r.a));
            expect(Number(back[i + 1][1])).toBe(Object.is(r.n, -0) ? 0 : r.n);
          });
        },
      ),
      { numRuns: 200 },
    );
  });

  it('adds feet columns after the contract columns with units imperial, keeping the metres', () => {
    const rows = readBack(stopsCsv(sample, { units: 'imperial' }));
    const header = rows[0];
    expect(header.slice(0, STOP_HEADER.split(',').length).join(',')).toBe(STOP_HEADER);
    expect(header.slice(STOP_HEADER.split(',').length)).toEqual(['dist_along_ft', 'gap_before_ft', 'gap_after_ft']);
    const m = header.indexOf('gap_after_m');
    const ft = header.indexOf('gap_after_ft');
    for (const r of rows.slice(1)) {
      if (r[m] === '') expect(r[ft]).toBe('');
      // 1 ft = 0.3048 m exactly (international yard and pound agreement, 1959) [C]
      else expect(Math.abs(Number(r[ft]) - Number(r[m]) / 0.3048)).toBeLessThanOrEqual(0.5 + 0.05 / 0.3048);
    }
    const pHeader = readBack(patternsCsv(sample, { units: 'imperial' }))[0];
    expect(pHeader).toContain('length_ft');
    expect(pHeader).toContain('optimal_spacing_ft');
    expect(pHeader).toContain('optimal_spacing_m');
  });

  it('rejects an unknown units value with a coded error', () => {
    expect(() => stopsCsv(sample, { units: 'furlongs' as never })).toThrowError(
      /invalid option units: expected "metric" or "imperial", got "furlongs"/,
    );
  });

  // Reference: ECMAScript's Number.prototype.toFixed (ECMA-262, section 21.1.3.3), as the engine runs it;
  // the cell is the number that text parses to, printed as String prints it, -0 as 0.
  const viaToFixed = (v: number, d: number): string => {
    const r = Number(v.toFixed(d));
    return String(Object.is(r, -0) ? 0 : r);
  };

  it('prints number cells exactly as toFixed and back would, ties and signs included', () => {
    const cases = [
      1.005,
      1.015,
      2.675,
      0.5,
      1.5,
      2.5,
      -0.5,
      -2.5,
      -1.005,
      0.05,
      0.15,
      1e-7,
      -1e-7,
      0.0000005,
      40.7128235,
      -73.9856445,
      123456.75,
      214748.36475,
      1e15 + 0.5,
      12345678901.25,
      0.1 + 0.2,
    ];
    for (const v of cases) for (const d of [0, 1, 2, 3, 6]) expect(formatNumber(v, d), `${v} to ${d}`).toBe(viaToFixed(v, d));
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e7, max: 1e7 }),
        fc.constantFrom(1, 2, 3, 6),
        (v, d) => formatNumber(v, d) === viaToFixed(v, d),
      ),
      { numRuns: 20000 },
    );
    // values at exact halves of the last decimal, where rounding is decided by the binary value
    fc.assert(
      fc.property(fc.integer({ min: -2e8, max: 2e8 }), fc.constantFrom(1, 2, 3), (k, d) => {
        const v = (k + 0.5) / 10 ** d;
        return formatNumber(v, d) === viaToFixed(v, d);
      }),
      { numRuns: 20000 },
    );
    expect(formatNumber(-0.04, 1)).toBe('0');
    expect(formatNumber(Number.NaN, 1)).toBe('');
  });
});
