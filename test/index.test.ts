// The library's public API: the names src/index.ts exports (so an accidental export, or a lost one, shows
// here), package.json's entry points agreeing with it, and the entry points' typed parameters: a partial
// object works, with the rest at their defaults, and a bad one is refused with a StopspanError.
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import * as stopspan from '../src/index.js';
import { auditFeed, evaluateScenario, normalizeParams, runAudit, StopspanError, type ModelParams, type ParamsInput } from '../src/index.js';
import { handmadeNetwork } from './helpers/handmade.js';

const ROOT = join(import.meta.dirname, '..');

/** Every value the library exports (types leave no trace at run time; tsc checks those this file uses). */
const PUBLIC_NAMES = [
  'CAUTIONS',
  'DEFAULT_LAND_USE_COLUMNS',
  'DEFAULT_THRESHOLDS',
  'FINDINGS',
  'FINDING_CODES',
  'PARAM_NAMES',
  'PARAM_SPECS',
  'REPORT_FORMATS',
  'SUMMARY_SCHEMA_VERSION',
  'StopspanError',
  'TripFindings',
  'VERDICTS',
  'WARNINGS',
  'WarningSink',
  'auditFeed',
  'auditRunRow',
  'buildPatterns',
  'checkFeed',
  'checkRunRow',
  'compareFeeds',
  'defaultParams',
  'evaluateScenario',
  'isStopspanError',
  'loadParams',
  'loadScenarioFile',
  'normalizeParams',
  'observeArchive',
  'openHistory',
  'parseLandUseWeights',
  'parseScenario',
  'readFeed',
  'readHistory',
  'readLandUse',
  'recordRun',
  'runAudit',
  'summaryJson',
  'tripProfiles',
  'version',
  'warningText',
  'writeReport',
];

const thrown = (f: () => unknown): unknown => {
  try {
    f();
  } catch (e) {
    return e;
  }
  return undefined;
};

describe('the public API', () => {
  it('exports exactly the listed names', () => {
    expect(Object.keys(stopspan).sort()).toEqual([...PUBLIC_NAMES].sort());
  });

  it('is what package.json points at: the built index, its types, and every schema under stopspan/schema/', () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as {
      main: string;
      types: string;
      exports: Record<string, string>;
      files: string[];
      license: string;
    };
    // the licence package.json names is the one the LICENSE file grants (SPDX identifier MIT)
    expect(pkg.license).toBe('MIT');
    expect(readFileSync(join(ROOT, 'LICENSE'), 'utf8')).toMatch(/^MIT License\n[\s\S]*Permission is hereby granted, free of charge/);
    expect(pkg.exports['.']).toBe(`./${pkg.main}`);
    expect(pkg.main).toBe('dist/index.js'); // tsc's output of src/index.ts (tsconfig.json: rootDir src, outDir dist)
    expect(pkg.types).toBe('dist/index.d.ts');
    expect(pkg.exports['./schema/*']).toBe('./schema/*');
    expect(pkg.files).toEqual(expect.arrayContaining(['dist', 'schema']));
    const schemas = readdirSync(join(ROOT, 'schema')).filter((f) => f.endsWith('.schema.json'));
    expect(schemas.sort()).toEqual([
      'check.schema.json',
      'compare.schema.json',
      'error.schema.json',
      'history.schema.json',
      'summary.schema.json',
    ]);
    const tsconfig = JSON.parse(readFileSync(join(ROOT, 'tsconfig.json'), 'utf8')) as {
      compilerOptions: { rootDir?: string; outDir?: string; declaration?: boolean };
    };
    expect(tsconfig.compilerOptions).toMatchObject({ rootDir: 'src', outDir: 'dist', declaration: true });
  });
});

describe('parameters at the entry points', () => {
  const { feed, patterns } = handmadeNetwork({ tripsPerDay: 40 });

  it("take a partial object: the names given are the user's, the rest their defaults", () => {
    const params: Partial<ModelParams> = { walk_weight: 2.2, stopping_model: 'always' };
    const r = runAudit(feed, patterns, { params, generatedAt: '2026-10-14T00:00:00Z' });
    expect(r.params.walk_weight).toMatchObject({ value: 2.2, source: 'user' });
    expect(r.params.stopping_model).toMatchObject({ value: 'always', source: 'user' });
    expect(r.params.walk_speed_mps).toMatchObject({
      value: stopspan.PARAM_SPECS.walk_speed_mps.default,
      source: stopspan.PARAM_SPECS.walk_speed_mps.source,
    });
    const w = evaluateScenario(feed, patterns, { remove: [feed.stops[patterns.patterns[0].stopIdx[3]].id] }, { params });
    expect(w.params.walk_weight).toMatchObject({ value: 2.2, source: 'user' });
  });

  it('give the same result for an object and for what normalizeParams made of it, which is not checked again', () => {
    const params: ParamsInput = { walk_weight: 2.2, max_gap_m: 600 };
    const np = normalizeParams(params);
    expect(normalizeParams(np)).toBe(np);
    expect(Object.isFrozen(np.values)).toBe(true);
    const a = runAudit(feed, patterns, { params, generatedAt: '2026-10-14T00:00:00Z' });
    const b = runAudit(feed, patterns, { params: np, generatedAt: '2026-10-14T00:00:00Z' });
    expect(JSON.stringify(b)).toBe(JSON.stringify(a));
  });

  it('refuse a bad value or an unknown name with a StopspanError naming it', () => {
    const bad = thrown(() => runAudit(feed, patterns, { params: { walk_speed_mps: -1 } }));
    expect(bad).toBeInstanceOf(StopspanError);
    expect((bad as StopspanError).code).toBe('bad-option');
    expect((bad as StopspanError).message).toBe('invalid parameter walk_speed_mps: expected a number above 0, got -1');
    const removed = { remove: [feed.stops[patterns.patterns[0].stopIdx[3]].id] };
    // @ts-expect-error: an unknown name is refused by the type as well as at run time
    const unknown = thrown(() => evaluateScenario(feed, patterns, removed, { params: { walk_speed: 1.2 } }));
    expect(unknown).toBeInstanceOf(StopspanError);
    expect((unknown as StopspanError).message).toMatch(/^invalid parameter walk_speed: expected one of walk_speed_mps, /);
    // @ts-expect-error: a stopping model outside the list is refused by the type as well as at run time
    expect(() => runAudit(feed, patterns, { params: { stopping_model: 'sometimes' } })).toThrow(StopspanError);
  });

  it('auditFeed refuses a bad parameter before it reads the feed', async () => {
    // no such file: a parameter error first shows the feed was never opened
    const e = await auditFeed(join(ROOT, 'no-such-feed.zip'), { params: { band_tolerance: 5 } }).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(StopspanError);
    expect((e as StopspanError).message).toMatch(/^invalid parameter band_tolerance/);
  });
});
