// Reads the history back, oldest run first, each with its findings' counts.

import type { HistoryDb } from './openHistory.js';
import type { RunHeadline } from './recordRun.js';

export interface RunRecord {
  id: number;
  recordedAt: string;
  runDate: string;
  command: string;
  feed: { source: string; contentHash: string; version: string; publisher: string };
  headline: Required<RunHeadline>;
  severities: { error: number; warning: number; info: number };
  findings: Record<string, number>;
}

/** The feed a run belongs to: its publisher, or its source when the feed names no publisher. */
export function feedKey(r: Pick<RunRecord, 'feed'>): string {
  return r.feed.publisher || r.feed.source;
}

/** True when the run ran the feed checks (a check, or an audit recorded with one); an audit alone has no severities to plot. */
export function ranChecks(r: Pick<RunRecord, 'findings'>): boolean {
  return Object.keys(r.findings).length > 0;
}

export interface ReadHistoryOptions {
  command?: string; // only runs of this command
  feed?: string; // only runs of this feed, as feedKey names it (its publisher, else its source)
  limit?: number; // only the newest N runs (still returned oldest first)
}

interface RunSqlRow {
  id: number;
  recorded_at: string;
  run_date: string;
  command: string;
  feed_source: string;
  feed_version: string;
  content_hash: string;
  publisher: string;
  analysis_date: string | null;
  patterns: number | null;
  stops: number | null;
  trips: number | null;
  median_gap_m: number | null;
  mean_optimal_spacing_m: number | null;
  close_stops: number | null;
  wide_gaps: number | null;
  pax_min_lost_per_day: number | null;
  errors: number;
  warnings: number;
  infos: number;
}

export function readHistory(db: HistoryDb, options: ReadHistoryOptions = {}): RunRecord[] {
  const { command, feed, limit = -1 } = options;
  const conditions: string[] = [];
  const params: Record<string, string | number> = { limit };
  if (command) {
    conditions.push('command = @command');
    params.command = command;
  }
  if (feed) {
    conditions.push("(publisher = @feed OR (publisher = '' AND feed_source = @feed))");
    params.feed = feed;
  }
  const where = conditions.length ? `WHERE ${conditions.join(' AND ')}` : '';
  const rows = db
    .prepare(`SELECT * FROM (SELECT * FROM runs ${where} ORDER BY run_date DESC, id DESC LIMIT @limit) ORDER BY run_date, id`)
    .all(params) as RunSqlRow[];
  const counts = db.prepare('SELECT code, count FROM run_findings WHERE run_id = ? ORDER BY code');
  return rows.map((r) => ({
    id: r.id,
    recordedAt: r.recorded_at,
    runDate: r.run_date,
    command: r.command,
    feed: { source: r.feed_source, contentHash: r.content_hash, version: r.feed_version, publisher: r.publisher },
    headline: {
      analysisDate: r.analysis_date,
      patterns: r.patterns,
      stops: r.stops,
      trips: r.trips,
      medianGapM: r.median_gap_m,
      meanOptimalSpacingM: r.mean_optimal_spacing_m,
      closeStops: r.close_stops,
      wideGaps: r.wide_gaps,
      paxMinLostPerDay: r.pax_min_lost_per_day,
    },
    severities: { error: r.errors, warning: r.warnings, info: r.infos },
    findings: Object.fromEntries((counts.all(r.id) as { code: string; count: number }[]).map((c) => [c.code, c.count])),
  }));
}
