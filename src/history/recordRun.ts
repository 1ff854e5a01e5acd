// Records one run in the history, in one transaction: the run row and its findings' counts land together
// or not at all.

import { StopspanError } from '../common/errors.js';
import type { HistoryDb } from './openHistory.js';

export interface RunHeadline {
  analysisDate?: string | null; // YYYY-MM-DD the audit ran for
  patterns?: number | null;
  stops?: number | null;
  trips?: number | null;
  medianGapM?: number | null;
  meanOptimalSpacingM?: number | null;
  closeStops?: number | null;
  wideGaps?: number | null;
  paxMinLostPerDay?: number | null;
}

export interface RunRow {
  runDate: string; // YYYY-MM-DD: the date the job ran for (the CLI's --today)
  command: string; // 'check', 'audit', ...
  feed: { source: string; contentHash: string; version: string; publisher?: string };
  headline?: RunHeadline;
  /** Findings' counts by code (zero counts may be given and are stored). */
  findings?: Record<string, number>;
  /** How many kinds of finding at each severity. */
  severities?: { error?: number; warning?: number; info?: number };
  recordedAt?: string; // ISO time; default now
}

/** Inserts the run and returns its id. Throws bad-option on a malformed row, history-db on a write failure. */
export function recordRun(db: HistoryDb, row: RunRow): number {
  validate(row);
  const h = row.headline ?? {};
  const s = row.severities ?? {};
  const insertRun = db.prepare(`INSERT INTO runs (recorded_at, run_date, command, feed_source, feed_version, content_hash,
      publisher, analysis_date, patterns, stops, trips, median_gap_m, mean_optimal_spacing_m, close_stops, wide_gaps,
      pax_min_lost_per_day, errors, warnings, infos)
    VALUES (@recordedAt, @runDate, @command, @source, @version, @contentHash, @publisher, @analysisDate, @patterns, @stops,
      @trips, @medianGapM, @meanOptimalSpacingM, @closeStops, @wideGaps, @paxMinLostPerDay, @errors, @warnings, @infos)`);
  const insertFinding = db.prepare('INSERT INTO run_findings (run_id, code, count) VALUES (?, ?, ?)');
  const write = db.transaction((): number => {
    const info = insertRun.run({
      recordedAt: row.recordedAt ?? new Date().toISOString(),
      runDate: row.runDate,
      command: row.command,
      source: row.feed.source,
      version: row.feed.version,
      contentHash: row.feed.contentHash,
      publisher: row.feed.publisher ?? '',
      analysisDate: h.analysisDate ?? null,
      patterns: h.patterns ?? null,
      stops: h.stops ?? null,
      trips: h.trips ?? null,
      medianGapM: h.medianGapM ?? null,
      meanOptimalSpacingM: h.meanOptimalSpacingM ?? null,
      closeStops: h.closeStops ?? null,
      wideGaps: h.wideGaps ?? null,
      paxMinLostPerDay: h.paxMinLostPerDay ?? null,
      errors: s.error ?? 0,
      warnings: s.warning ?? 0,
      infos: s.info ?? 0,
    });
    const id = Number(info.lastInsertRowid);
    for (const [code, count] of Object.entries(row.findings ?? {})) insertFinding.run(id, code, count);
    return id;
  });
  try {
    return write.immediate();
  } catch (e) {
    throw new StopspanError('history-db', `cannot record the run in the history: ${(e as Error).message}`, { file: db.name });
  }
}

function validate(row: RunRow): void {
  const bad = (name: string, expected: string, got: unknown): never => {
    throw new StopspanError('bad-option', `invalid run ${name}: expected ${expected}, got ${JSON.stringify(got)}`, { value: String(got) });
  };
  if (!row || typeof row !== 'object') bad('row', 'an object', row);
  if (typeof row.runDate !== 'string' || !/^\d{4}-\d{2}-\d{2}$/.test(row.runDate)) bad('runDate', 'YYYY-MM-DD', row.runDate);
  if (typeof row.command !== 'string' || row.command === '') bad('command', 'a command name', row.command);
  if (
    !row.feed ||
    typeof row.feed.contentHash !== 'string' ||
    typeof row.feed.source !== 'string' ||
    typeof row.feed.version !== 'string'
  ) {
    bad('feed', '{ source, contentHash, version } strings', row.feed);
  }
  for (const [code, count] of Object.entries(row.findings ?? {})) {
    if (!Number.isInteger(count) || count < 0) bad(`findings.${code}`, 'an integer >= 0', count);
  }
  for (const [k, v] of Object.entries(row.headline ?? {})) {
    if (k === 'analysisDate') continue;
    if (v !== null && v !== undefined && (typeof v !== 'number' || !Number.isFinite(v))) bad(`headline.${k}`, 'a finite number or null', v);
  }
}
