// Parameter normalisation: defaults with sources, user values, and the errors that name the parameter.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultParams, loadParams, loadParamsFile, normalizeParams, paramsReport, PARAM_NAMES } from '../../src/model/params.js';
import { thrown } from '../helpers/errors.js';
import { tempDir } from '../helpers/tempDir.js';

describe('normalizeParams', () => {
  it('fills every name of the design notes with its default', () => {
    expect([...PARAM_NAMES].sort()).toEqual(
      [
        'walk_speed_mps',
        'walk_weight',
        'door_time_s',
        'accel_mps2',
        'decel_mps2',
        'reentry_delay_s',
        'cruise_speed_mps',
        'mean_trip_length_m',
        'band_tolerance',
        'max_gap_m',
        'stopping_model',
        'assumed_boardings_per_trip_km',
        'operating_cost_per_vehicle_hour',
        'value_of_time_per_hour',
      ].sort(),
    );
    const { values, given } = normalizeParams(undefined);
    expect(given).toEqual([]);
    // [S] HCM 2010 via design notes: 4.0 ft/s2 = 1.22 m/s2; common practice 1.2 m/s walking; design band 5 %
    expect(values).toMatchObject({
      walk_speed_mps: 1.2,
      walk_weight: 2,
      door_time_s: 5,
      accel_mps2: 1.22,
      decel_mps2: 1.22,
      reentry_delay_s: 2,
      band_tolerance: 0.05,
      max_gap_m: 800,
      stopping_model: 'auto',
      cruise_speed_mps: null,
    });
  });
  it('takes user values, also numbers given as strings, and reports them as user-set', () => {
    const np = normalizeParams({ walk_weight: '2.5', stopping_model: 'always', cruise_speed_mps: 9 });
    expect(np.values.walk_weight).toBe(2.5);
    expect(np.values.cruise_speed_mps).toBe(9);
    const rep = paramsReport(np);
    expect(rep.walk_weight.source).toBe('user');
    expect(rep.door_time_s.source).toBe('C');
    expect(rep.accel_mps2.source).toBe('S');
    expect(Object.keys(rep).length).toBe(14);
    for (const v of Object.values(rep)) expect(v.note.length).toBeGreaterThan(5);
  });
  it('rejects unknown keys by name', () => {
    const e = thrown(() => normalizeParams({ walk_speed: 1.2 }));
    expect(e.code).toBe('bad-option');
    expect(e.message).toMatch(/^invalid parameter walk_speed: expected one of walk_speed_mps/);
  });
  it('rejects bad values with what was expected and what was given', () => {
    expect(thrown(() => normalizeParams({ walk_speed_mps: -1 })).message).toBe(
      'invalid parameter walk_speed_mps: expected a number above 0, got -1',
    );
    expect(thrown(() => normalizeParams({ band_tolerance: 5 })).message).toBe(
      'invalid parameter band_tolerance: expected a number between 0 and 1 (0.05 means 5 %), got 5',
    );
    expect(thrown(() => normalizeParams({ stopping_model: 'sometimes' })).message).toBe(
      'invalid parameter stopping_model: expected "auto", "always", "poisson" or "observed", got "sometimes"',
    );
    expect(thrown(() => normalizeParams({ door_time_s: 'abc' })).message).toBe(
      'invalid parameter door_time_s: expected a number of 0 or more, got "abc"',
    );
    expect(thrown(() => normalizeParams({ max_gap_m: null })).message).toMatch(
      /invalid parameter max_gap_m: expected a number above 0, got null/,
    );
    expect(thrown(() => normalizeParams({ operating_cost_per_vehicle_hour: 100 })).message).toMatch(
      /invalid parameter value_of_time_per_hour/,
    );
    expect(thrown(() => normalizeParams([1, 2])).code).toBe('bad-option');
  });
  it('returns fresh defaults each time', () => {
    const a = defaultParams();
    a.walk_weight = 9;
    expect(defaultParams().walk_weight).toBe(2);
  });
});

describe('loadParamsFile', () => {
  const dir = tempDir('stopspan-params-');
  it('reads a JSON file and names the file in errors', () => {
    const ok = join(dir, 'ok.json');
    writeFileSync(ok, '\uFEFF{"walk_weight": 1.5, "max_gap_m": 600}');
    expect(loadParamsFile(ok).values).toMatchObject({ walk_weight: 1.5, max_gap_m: 600 });
    const badKey = join(dir, 'bad.json');
    writeFileSync(badKey, '{"walkweight": 1.5}');
    const e = thrown(() => loadParamsFile(badKey));
    expect(e.context.file).toBe(badKey);
    expect(e.oneLine()).toContain('invalid parameter walkweight');
    const notJson = join(dir, 'nope.json');
    writeFileSync(notJson, '{walk_weight: 1.5}');
    expect(thrown(() => loadParamsFile(notJson)).message).toMatch(/not valid JSON/);
    expect(thrown(() => loadParamsFile(join(dir, 'missing.json'))).code).toBe('bad-option');
  });
});

describe('loadParams', () => {
  const dir = tempDir('stopspan-params-');
  it('puts single values on top of the file, numbers given as text read as numbers, both reported as set', () => {
    const file = join(dir, 'base.json');
    writeFileSync(file, '{"walk_weight": 1.5, "max_gap_m": 600}');
    const np = loadParams(file, { max_gap_m: '450', door_time_s: 4 });
    expect(np.values).toMatchObject({ walk_weight: 1.5, max_gap_m: 450, door_time_s: 4 });
    expect([...np.given].sort()).toEqual(['door_time_s', 'max_gap_m', 'walk_weight']);
    expect(loadParams(undefined, { walk_weight: 3 }).given).toEqual(['walk_weight']);
    expect(loadParams(undefined).given).toEqual([]);
  });
  it('refuses a file that is not an object of named values, naming the file, and a bad single value', () => {
    const list = join(dir, 'list.json');
    writeFileSync(list, '[1, 2]');
    const e = thrown(() => loadParams(list, { walk_weight: 3 }));
    expect(e.message).toBe('invalid parameters: expected an object of named values, got an array');
    expect(e.context.file).toBe(list);
    const none = join(dir, 'null.json');
    writeFileSync(none, 'null');
    expect(loadParams(none, { walk_weight: 3 }).values.walk_weight).toBe(3);
    expect(thrown(() => loadParams(undefined, { walk_speed_mps: 'fast' })).message).toBe(
      'invalid parameter walk_speed_mps: expected a number above 0, got "fast"',
    );
  });
});
