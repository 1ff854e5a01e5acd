// writeReport: every chosen format lands in the folder through a temporary sibling renamed into place;
// an existing folder is left untouched without force and replaced with it; a failure mid-write leaves
// no folder and no temporary files behind.

import { mkdtemp, readdir, readFile, rm, writeFile, mkdir } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { AuditResult } from '../../src/audit/types.js';
import { StopspanError } from '../../src/common/errors.js';
import { candidatesCsv, patternsCsv, stopsCsv } from '../../src/report/csv.js';
import { indexHtml } from '../../src/report/html/indexHtml.js';
import { summaryJson } from '../../src/report/summaryJson.js';
import { writeReport } from '../../src/report/writeReport.js';
import { REPORT_MARKER } from '../../src/report/writeFolder.js';
import { makeSampleResult } from './sampleResult.js';

const sample = makeSampleResult();
let work: string;

beforeEach(async () => {
  work = await mkdtemp(join(tmpdir(), 'stopspan-write-'));
});
afterEach(async () => {
  await rm(work, { recursive: true, force: true });
});

async function caught(p: Promise<unknown>): Promise<StopspanError> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(StopspanError);
    return e as StopspanError;
  }
  throw new Error('expected a rejection');
}

describe('writeReport', () => {
  it('writes every format into a new folder and returns the paths', async () => {
    const out = join(work, 'reports', 'vellmoor');
    const paths = await writeReport(sample, out);
    const names = [
      'index.html',
      'patterns.csv',
      'stops.csv',
      'candidates.csv',
      'patterns.geojson',
      'stops.geojson',
      'stop_points.geojson',
      'candidates.geojson',
      'summary.json',
    ];
    expect(paths).toEqual(names.map((n) => join(out, n)));
    expect((await readdir(out)).sort()).toEqual([...names, REPORT_MARKER].sort());
    expect(await readFile(join(out, 'stops.csv'), 'utf8')).toBe(stopsCsv(sample));
    expect(await readFile(join(out, 'patterns.csv'), 'utf8')).toBe(patternsCsv(sample));
    expect(await readFile(join(out, 'candidates.csv'), 'utf8')).toBe(candidatesCsv(sample));
    expect(await readFile(join(out, 'summary.json'), 'utf8')).toBe(summaryJson(sample));
    expect(await readFile(join(out, 'index.html'), 'utf8')).toBe(indexHtml(sample));
    expect(JSON.parse(await readFile(join(out, 'stops.geojson'), 'utf8')).features.length).toBe(sample.stops.length);
    expect(await readdir(join(work, 'reports'))).toEqual(['vellmoor']); // no temporary sibling left
  });

  it('writes only the chosen formats, with imperial columns when asked', async () => {
    const out = join(work, 'csv-only');
    await writeReport(sample, out, { formats: ['csv'], units: 'imperial' });
    expect((await readdir(out)).sort()).toEqual([REPORT_MARKER, 'candidates.csv', 'patterns.csv', 'stops.csv'].sort());
    expect((await readFile(join(out, 'stops.csv'), 'utf8')).split('\r\n')[0]).toMatch(/,gap_after_ft$/);
  });

  it('refuses an existing report without force and leaves it untouched', async () => {
    const out = join(work, 'existing');
    await writeReport(sample, out, { formats: ['json'] });
    const before = await readFile(join(out, 'summary.json'), 'utf8');
    const e = await caught(writeReport(sample, out, { formats: ['csv'] }));
    expect(e.code).toBe('output-exists');
    expect(e.message).toMatch(/already exists; choose another folder or pass --force/);
    expect((await readdir(out)).sort()).toEqual([REPORT_MARKER, 'summary.json']);
    expect(await readFile(join(out, 'summary.json'), 'utf8')).toBe(before);
    expect(await readdir(work)).toEqual(['existing']);
  });

  it('refuses a folder that is not a previous report, even with force, and leaves it untouched', async () => {
    const out = join(work, 'existing');
    await mkdir(out);
    await writeFile(join(out, 'notes.txt'), 'keep me');
    for (const force of [false, true]) {
      const e = await caught(writeReport(sample, out, { force }));
      expect(e.code).toBe('bad-output');
      expect(e.oneLine()).toMatch(/existing: cannot use this as the output folder: it exists and is not a stopspan output folder/);
    }
    expect(await readdir(out)).toEqual(['notes.txt']);
    expect(await readFile(join(out, 'notes.txt'), 'utf8')).toBe('keep me');
    expect(await readdir(work)).toEqual(['existing']);
  });

  it('replaces a previous report with force', async () => {
    const out = join(work, 'existing');
    await writeReport(sample, out, { formats: ['csv'] });
    await writeReport(sample, out, { force: true, formats: ['json'] });
    expect((await readdir(out)).sort()).toEqual([REPORT_MARKER, 'summary.json']);
    expect(await readdir(work)).toEqual(['existing']);
  });

  it('leaves no folder and no temporary files when rendering fails mid-write', async () => {
    const failing: AuditResult = { ...sample };
    Object.defineProperty(failing, 'candidates', {
      get() {
        throw new Error('renderer broke');
      },
    });
    const out = join(work, 'half');
    await expect(writeReport(failing, out, { formats: ['json', 'csv'] })).rejects.toThrow(/renderer broke/);
    expect(await readdir(work)).toEqual([]);
  });

  it('keeps the previous report when a forced rewrite fails', async () => {
    const out = join(work, 'existing');
    await writeReport(sample, out, { formats: ['json'] });
    const before = await readFile(join(out, 'summary.json'), 'utf8');
    const failing: AuditResult = { ...sample };
    Object.defineProperty(failing, 'stops', {
      get() {
        throw new Error('renderer broke');
      },
    });
    await expect(writeReport(failing, out, { force: true })).rejects.toThrow(/renderer broke/);
    expect(await readdir(work)).toEqual(['existing']);
    expect(await readFile(join(out, 'summary.json'), 'utf8')).toBe(before);
  });

  it('rejects an unknown format or units with a coded error naming the value', async () => {
    const e = await caught(writeReport(sample, join(work, 'x'), { formats: ['pdf' as never] }));
    expect(e.code).toBe('bad-option');
    expect(e.message).toMatch(/invalid option formats: expected one of html, csv, geojson, json, gpkg, got "pdf"/);
    const u = await caught(writeReport(sample, join(work, 'x'), { units: 'nautical' as never }));
    expect(u.code).toBe('bad-option');
    expect((await caught(writeReport(sample, join(work, 'x'), { formats: [] }))).code).toBe('bad-option');
    expect(await readdir(work)).toEqual([]);
  });
});
