// Writes the report folder atomically: every file goes into a temporary sibling folder, which is then
// renamed into place, so an interrupted or failed run never leaves a half-written report. An existing
// folder is replaced only with force. The only module of src/report that touches the disk.

import { mkdir, rename, rm, stat, writeFile } from 'node:fs/promises';
import { basename, dirname, join, resolve } from 'node:path';
import type { AuditResult } from '../audit/types.js';
import { StopspanError } from '../common/errors.js';
import { candidatesCsv, patternsCsv, stopsCsv } from './csv.js';
import { patternsGeoJson, stopsGeoJson } from './geojson.js';
import { indexHtml } from './html/indexHtml.js';
import { summaryJson } from './summaryJson.js';
import { checkUnits, type Units } from './units.js';

export type ReportFormat = 'html' | 'csv' | 'geojson' | 'json';
export const REPORT_FORMATS: readonly ReportFormat[] = ['html', 'csv', 'geojson', 'json'];

export interface WriteReportOptions {
  formats?: ReportFormat[];
  units?: Units;
  force?: boolean;
}

/** Which files each format writes, and how to render them. */
const FILES: Record<ReportFormat, [string, (r: AuditResult, units: Units) => string][]> = {
  json: [['summary.json', (r) => summaryJson(r)]],
  csv: [
    ['patterns.csv', (r, units) => patternsCsv(r, { units })],
    ['stops.csv', (r, units) => stopsCsv(r, { units })],
    ['candidates.csv', (r, units) => candidatesCsv(r, { units })],
  ],
  geojson: [
    ['patterns.geojson', (r) => JSON.stringify(patternsGeoJson(r)) + '\n'],
    ['stops.geojson', (r) => JSON.stringify(stopsGeoJson(r)) + '\n'],
  ],
  html: [['index.html', (r, units) => indexHtml(r, { units })]],
};

async function exists(path: string): Promise<boolean> {
  try {
    await stat(path);
    return true;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return false;
    throw e;
  }
}

function uniqueSuffix(): string {
  return `${process.pid}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`;
}

/**
 * Renders the chosen formats and writes them into outDir. Returns the paths written (inside outDir).
 * Throws StopspanError 'output-exists' when outDir exists and force is not set; 'bad-option' for an
 * unknown format or units.
 */
export async function writeReport(result: AuditResult, outDir: string, options: WriteReportOptions = {}): Promise<string[]> {
  const { formats = [...REPORT_FORMATS], units = 'metric', force = false } = options;
  checkUnits(units);
  if (!Array.isArray(formats) || formats.length === 0) {
    throw new StopspanError('bad-option', `invalid option formats: expected one or more of ${REPORT_FORMATS.join(', ')}, got none`, { value: String(formats) });
  }
  for (const f of formats) {
    if (!REPORT_FORMATS.includes(f)) {
      throw new StopspanError('bad-option', `invalid option formats: expected one of ${REPORT_FORMATS.join(', ')}, got ${JSON.stringify(f)}`, { value: String(f) });
    }
  }
  if (typeof outDir !== 'string' || outDir.trim() === '') {
    throw new StopspanError('bad-option', 'invalid option out: expected a folder path, got an empty string', { value: String(outDir) });
  }
  const target = resolve(outDir);
  if (!force && (await exists(target))) {
    throw new StopspanError('output-exists', `output folder ${outDir} already exists; choose another folder or pass --force to replace it`, { file: outDir });
  }
  const parent = dirname(target);
  await mkdir(parent, { recursive: true });
  const tmp = join(parent, `.${basename(target)}.tmp-${uniqueSuffix()}`);
  const wanted = REPORT_FORMATS.filter((f) => formats.includes(f)); // fixed order, no duplicates
  const names: string[] = [];
  let old: string | null = null;
  try {
    await mkdir(tmp);
    for (const f of wanted) {
      for (const [name, render] of FILES[f]) {
        await writeFile(join(tmp, name), render(result, units), 'utf8');
        names.push(name);
      }
    }
    if (await exists(target)) {
      if (!force) {
        throw new StopspanError('output-exists', `output folder ${outDir} appeared while the report was being written; pass --force to replace it`, { file: outDir });
      }
      old = join(parent, `.${basename(target)}.old-${uniqueSuffix()}`);
      await rename(target, old);
    }
    await rename(tmp, target);
  } catch (e) {
    await rm(tmp, { recursive: true, force: true });
    if (old !== null && !(await exists(target))) await rename(old, target); // put the previous report back
    throw e;
  }
  if (old !== null) await rm(old, { recursive: true, force: true });
  return names.map((n) => join(target, n));
}
