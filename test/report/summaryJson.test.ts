// summary.json against its JSON Schema (draft 2020-12, validated by ajv, the outside validator): the
// output validates, broken documents do not, every field in the schema is documented, keys are
// snake_case, and the figures and cautions are those of the audit.

import { readFileSync } from 'node:fs';
import Ajv2020 from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { CAUTIONS } from '../../src/report/cautions.js';
import { summaryJson, summaryObject } from '../../src/report/summaryJson.js';
import { makeSampleResult } from './sampleResult.js';

const schema = JSON.parse(readFileSync(new URL('../../schema/summary.schema.json', import.meta.url), 'utf8'));
// RFC 3339 section 5.6 date-time [C], the meaning JSON Schema gives "format": "date-time"
const RFC3339 = /^\d{4}-\d{2}-\d{2}[Tt ]\d{2}:\d{2}:\d{2}(\.\d+)?([Zz]|[+-]\d{2}:\d{2})$/;
const ajv = new Ajv2020.default({
  allErrors: true,
  strict: true,
  allowUnionTypes: true,
  formats: { 'date-time': (s: string) => RFC3339.test(s) && !Number.isNaN(Date.parse(s)) },
});
const validate = ajv.compile(schema);
const sample = makeSampleResult();

function keysDeep(v: unknown, skipChildrenOf: string[] = [], out: string[] = []): string[] {
  if (Array.isArray(v)) v.forEach((x) => keysDeep(x, skipChildrenOf, out));
  else if (v && typeof v === 'object')
    for (const [k, x] of Object.entries(v)) {
      out.push(k);
      if (!skipChildrenOf.includes(k)) keysDeep(x, skipChildrenOf, out);
    }
  return out;
}

describe('summary.json', () => {
  it('validates with a land-use layer, and marks its demand land-use', () => {
    const withLand = makeSampleResult();
    withLand.demandSource = 'land-use';
    withLand.landUse = {
      file: 'vellmoor-blocks.geojson',
      format: 'geojson',
      columns: [
        { name: 'population', weight: 1, total: 1200, covered: 1000 },
        { name: 'jobs', weight: 0.5, total: 400, covered: 300 },
      ],
      features: 3,
      featuresOutsideCatchments: 1,
      points: 40,
      people: 1400,
      peopleCovered: 1150,
      walkRadiusM: 400,
      walkDetour: 1.3,
    };
    const doc = summaryObject(withLand);
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.demand_source).toBe('land-use');
    expect((doc.land_use as { features_outside_catchments: number }).features_outside_catchments).toBe(1);
    expect((doc.headline as { pax_min_from_assumed_demand: boolean }).pax_min_from_assumed_demand).toBe(true);
  });

  it('validates against schema/summary.schema.json', () => {
    const doc = JSON.parse(summaryJson(sample));
    const ok = validate(doc);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });

  it('validates with a realtime archive read, each pattern saying what it observed, and not with a share above 1', () => {
    const withArchive = makeSampleResult();
    withArchive.observed = { source: 'rt.zip', snapshotsRead: 40, snapshotsSkipped: 1, tripsMatched: 12, tripsUnmatched: 0 };
    withArchive.patterns[0].observed = {
      tripsObserved: 12,
      dwellS: 20,
      doorTimeS: 20,
      stopLossS: null,
      cruiseSpeedMps: null,
      stopShare: 0.75,
      lostTimeParts: ['door_time'],
    };
    const doc = JSON.parse(summaryJson(withArchive));
    expect(doc.observed.patterns).toHaveLength(1);
    expect(validate(doc)).toBe(true);
    expect(JSON.parse(summaryJson(sample)).observed).toBeNull();
    doc.observed.patterns[0].stop_share = 1.5;
    expect(validate(doc)).toBe(false);
  });

  it('fails validation when a field is missing, misspelt or out of its range', () => {
    const base = JSON.parse(summaryJson(sample));
    const broken = [
      (() => {
        const d = structuredClone(base);
        delete d.cautions;
        return d;
      })(),
      (() => {
        const d = structuredClone(base);
        d.demand_source = 'guessed';
        return d;
      })(),
      (() => {
        const d = structuredClone(base);
        d.headline.paxMinLostPerDay = 1;
        return d;
      })(),
      (() => {
        const d = structuredClone(base);
        d.date = '18/11/2026';
        return d;
      })(),
      (() => {
        const d = structuredClone(base);
        d.generated_at = 'yesterday';
        return d;
      })(),
      (() => {
        const d = structuredClone(base);
        d.parameters.walk_weight.source = 'guess';
        return d;
      })(),
      (() => {
        const d = structuredClone(base);
        d.counts.patterns = -1;
        return d;
      })(),
    ];
    for (const d of broken) expect(validate(d)).toBe(false);
  });

  it('documents every property in the schema', () => {
    const missing: string[] = [];
    const walk = (node: Record<string, unknown>, path: string): void => {
      const props = node.properties as Record<string, Record<string, unknown>> | undefined;
      if (props)
        for (const [k, child] of Object.entries(props)) {
          if (typeof child.description !== 'string' || child.description.length < 3) missing.push(`${path}.${k}`);
          walk(child, `${path}.${k}`);
        }
      for (const key of ['items', 'additionalProperties']) {
        const c = node[key];
        if (c && typeof c === 'object') walk(c as Record<string, unknown>, `${path}[]`);
      }
    };
    walk(schema, '$');
    expect(missing).toEqual([]);
  });

  it('uses snake_case keys and carries the audit figures, parameters with sources, warnings and cautions', () => {
    const doc = summaryObject(sample) as Record<string, any>;
    for (const k of keysDeep(doc)) expect(k).toMatch(/^[a-z][a-z0-9_]*$/);
    expect(doc.feed.publisher).toBe(sample.feed.publisher);
    expect(doc.date).toBe('2026-11-18');
    expect(doc.counts.patterns).toBe(sample.patterns.length);
    expect(doc.counts.stop_rows).toBe(sample.stops.length);
    expect(doc.counts.candidates).toBe(sample.candidates.length);
    expect(doc.headline.pax_min_lost_per_day).toBeCloseTo(sample.headline.paxMinLostPerDay, 1);
    expect(doc.headline.pax_min_from_assumed_demand).toBe(true);
    expect(doc.demand_source).toBe('assumed');
    expect(doc.lost_time_source).toBe('default');
    expect(doc.parameters.walk_speed_mps).toEqual({ value: 1.3, source: 'M', note: sample.params.walk_speed_mps.note });
    expect(doc.parameters.cruise_speed_mps.value).toBeNull();
    expect(doc.top_candidates.length).toBe(Math.min(10, sample.candidates.length));
    expect(doc.top_candidates[0].net_pax_min_per_day).toBeCloseTo(sample.candidates[0].netPaxMinPerDay, 1);
    expect(doc.sensitivity.map((s: { label: string }) => s.label)).toEqual(sample.sensitivity.map((s) => s.label));
    expect(doc.warnings[1].examples).toEqual(sample.warnings[1].examples);
    expect(doc.assumptions).toEqual(sample.assumptions);
    expect(doc.cautions).toEqual([...CAUTIONS]);
    expect(doc.cautions.join(' ')).toMatch(/ADA/);
    expect(doc.cautions.join(' ')).toMatch(/Title VI/);
    expect(doc.cautions.join(' ')).toMatch(/assumed demand is labelled as assumed/);
  });

  it('is JSON.stringify output: parsing it gives back the object, markup and quotes untouched', () => {
    const text = summaryJson(sample);
    expect(JSON.parse(text)).toEqual(summaryObject(sample));
    expect(JSON.parse(text).warnings[1].message).toContain('<img src=x onerror=alert(3)>');
    expect(text.endsWith('}\n')).toBe(true);
  });
});
