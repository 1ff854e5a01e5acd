// Renders the audit's outputs (the formats asked for) and writes them as one folder, atomically, through
// writeFolder: an interrupted or failed run never leaves a half-written report.

import type { AuditResult } from '../audit/types.js';
import { StopspanError } from '../common/errors.js';
import { candidatesCsv, patternsCsv, stopsCsv } from './csv.js';
import { candidatesGeoJson, patternsGeoJson, stopPointsGeoJson, stopsGeoJson } from './geojson.js';
import { geoPackageFile, GPKG_FILE, loadGeoPackageSqlite } from './gpkg.js';
import { indexHtml } from './html/indexHtml.js';
import { fullJson, summaryJson } from './summaryJson.js';

export { fullJson, summaryJson };
import { checkUnits, type Units } from './units.js';
import { writeFolder, type FileWriter } from './writeFolder.js';

export type ReportFormat = 'html' | 'csv' | 'geojson' | 'json' | 'gpkg';
export const REPORT_FORMATS: readonly ReportFormat[] = ['html', 'csv', 'geojson', 'json', 'gpkg'];
/** Written when no formats are named: all but the GeoPackage, which needs the optional SQLite binding. */
const DEFAULT_FORMATS: readonly ReportFormat[] = REPORT_FORMATS.filter((f) => f !== 'gpkg');

export interface WriteReportOptions {
  formats?: ReportFormat[];
  units?: Units;
  force?: boolean;
  /** What the run read (feed, ridership, ...): a folder holding one is never replaced. */
  inputs?: (string | undefined)[];
}

/** Which files each format writes, and how to render them. */
const FILES: Record<ReportFormat, [string, (r: AuditResult, units: Units) => string | FileWriter | null][]> = {
  json: [
    ['summary.json', (r) => summaryJson(r)],
    // the optimiser's plan as a scenario whatif reads back (absent when the optimiser keeps every stop)
    ['plan.json', (r) => (r.plan ? JSON.stringify(r.plan.scenario, null, 2) + '\n' : null)],
  ],
  csv: [
    ['patterns.csv', (r, units) => patternsCsv(r, { units })],
    ['stops.csv', (r, units) => stopsCsv(r, { units })],
    ['candidates.csv', (r, units) => candidatesCsv(r, { units })],
  ],
  geojson: [
    ['patterns.geojson', (r) => JSON.stringify(patternsGeoJson(r)) + '\n'],
    ['stops.geojson', (r) => JSON.stringify(stopsGeoJson(r)) + '\n'],
    ['stop_points.geojson', (r) => JSON.stringify(stopPointsGeoJson(r)) + '\n'],
    ['candidates.geojson', (r) => JSON.stringify(candidatesGeoJson(r)) + '\n'],
  ],
  html: [['index.html', (r, units) => indexHtml(r, { units })]],
  // the map layers again, as one GeoPackage (metric, as the GeoJSON)
  gpkg: [[GPKG_FILE, (r) => geoPackageFile(r)]],
};

/**
 * Renders the chosen formats and writes them into outDir. Returns the paths written (inside outDir).
 * Throws StopspanError 'output-exists' when outDir exists and force is not set, 'bad-output' when it may
 * not be replaced or cannot be written (see writeFolder); 'bad-option' for an unknown format or units, and
 * for 'gpkg' without the optional SQLite binding (before anything is written). By default every format
 * but 'gpkg'.
 */
export async function writeReport(result: AuditResult, outDir: string, options: WriteReportOptions = {}): Promise<string[]> {
  const { formats = [...DEFAULT_FORMATS], units = 'metric', force = false, inputs } = options;
  checkUnits(units);
  if (!Array.isArray(formats) || formats.length === 0) {
    throw new StopspanError('bad-option', `invalid option formats: expected one or more of ${REPORT_FORMATS.join(', ')}, got none`, {
      value: String(formats),
    });
  }
  for (const f of formats) {
    if (!REPORT_FORMATS.includes(f)) {
      throw new StopspanError(
        'bad-option',
        `invalid option formats: expected one of ${REPORT_FORMATS.join(', ')}, got ${JSON.stringify(f)}`,
        { value: String(f) },
      );
    }
  }
  const wanted = REPORT_FORMATS.filter((f) => formats.includes(f)); // fixed order, no duplicates
  if (wanted.includes('gpkg')) loadGeoPackageSqlite();
  const files: [string, () => string | FileWriter][] = wanted.flatMap((f) =>
    FILES[f].flatMap(([name, render]) =>
      name === 'plan.json' && !result.plan ? [] : [[name, () => render(result, units) ?? ''] as [string, () => string | FileWriter]],
    ),
  );
  return writeFolder(outDir, files, { force, inputs });
}
