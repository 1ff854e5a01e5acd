// The history as a plain-text table for the terminal: one line per run, newest last.

import { terminalText as shown } from '../common/terminalText.js';
import type { RunRecord } from './readHistory.js';

const num = (v: number | null, digits = 0): string => (v === null ? '-' : v.toFixed(digits));

export function historyText(rows: RunRecord[]): string {
  if (rows.length === 0) return 'no runs recorded yet\n';
  const header = ['run date', 'command', 'feed version', 'hash', 'median gap m', 'close', 'wide', 'pax-min lost/day', 'errors', 'warnings', 'findings'];
  const body = rows.map((r) => [
    r.runDate,
    r.command,
    shown(r.feed.version ?? '') || '-',
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
  return [line(header), ...body.map(line), ...changeLines(rows)].join('\n') + '\n';
}

/** What changed between the last two runs: the feed, and each finding's count. */
function changeLines(rows: RunRecord[]): string[] {
  if (rows.length < 2) return [];
  const a = rows[rows.length - 2];
  const b = rows[rows.length - 1];
  const out: string[] = [];
  out.push('');
  out.push(`since the previous run (${a.runDate}): ${a.feed.contentHash === b.feed.contentHash ? 'same feed content' : 'new feed content'}`);
  const codes = [...new Set([...Object.keys(a.findings), ...Object.keys(b.findings)])].sort();
  for (const code of codes) {
    const d = (b.findings[code] ?? 0) - (a.findings[code] ?? 0);
    if (d !== 0) out.push(`  ${code} ${d > 0 ? '+' : ''}${d} (now ${b.findings[code] ?? 0})`);
  }
  if (out.length === 2) out.push('  no finding changed its count');
  return out;
}
