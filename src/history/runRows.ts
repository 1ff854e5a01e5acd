// Turns a check report or an audit result into the history row of its run.

import type { CheckReport } from '../check/check.js';
import type { AuditResult } from '../audit/types.js';
import type { RunRow } from './recordRun.js';

/** The history row of a `check` run. */
export function checkRunRow(report: CheckReport, command = 'check'): RunRow {
  return {
    runDate: report.today,
    command,
    feed: { ...report.feed },
    headline: {
      analysisDate: report.network.date || null,
      patterns: report.network.patterns,
      stops: report.network.stopsServed,
      trips: report.network.tripsPerDay,
      medianGapM: report.network.medianGapM,
    },
    findings: { ...report.counts },
    severities: { ...report.bySeverity },
  };
}

/**
 * The history row of an `audit` run; pass the check report too when the job ran both. Its run date is the
 * date the audit analysed (the clock time is recordedAt), so the history's time axis is the feed's dates.
 */
export function auditRunRow(result: AuditResult, options: { runDate?: string; check?: CheckReport; command?: string } = {}): RunRow {
  const { runDate = result.date, check, command = 'audit' } = options;
  const h = result.headline;
  return {
    runDate,
    command,
    feed: {
      source: result.feed.source,
      contentHash: result.feed.contentHash,
      version: result.feed.version,
      publisher: result.feed.publisher,
    },
    headline: {
      analysisDate: result.date,
      patterns: h.patterns,
      stops: h.stops,
      trips: h.trips,
      medianGapM: h.medianGapM,
      meanOptimalSpacingM: h.meanOptimalSpacingM,
      closeStops: h.closeStops,
      wideGaps: h.wideGaps,
      paxMinLostPerDay: h.paxMinLostPerDay,
    },
    findings: check ? { ...check.counts } : undefined,
    severities: check ? { ...check.bySeverity } : undefined,
  };
}
