// The history as a plain-text table for the terminal: one line per run, newest last.

import type { RunRecord } from './readHistory.js';

const num = (v: number | null, digits = 0): string => (v === null ? '-' : v.toFixed(digits));

export function historyText(rows: RunRecord[]): string {
  if (rows.length === 0) return 'no runs recorded yet\n';
  const header = ['run date', 'command', 'feed version', 'hash', 'median gap m', 'close', 'wide', 'pax-min lost/day', 'errors', 'warnings', 'findings'];
  const body = rows.map((r) => [
    r.runDate,
    r.command,
    r.feed.version || '-',
    r.feed.contentHash.slice(0, 8),
    num(r.headline.medianGapM, 1),
    num(r.headline.closeStops),
    num(r.headline.wideGaps),
    num(r.headline.paxMinLostPerDay),
    String(r.severities.error),
    String(r.severities.warning),
    String(Object.values(r.findings).reduce((a, b) => a + b, 0)),
  ]);
  const widths = header.map((h, i) => Math.max(h.length, ...body.map((b) => b[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => (i < 4 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ').trimEnd();
  return [line(header), ...body.map(line)].join('\n') + '\n';
}
