// The history as a plain-text table for the terminal: one line per run, newest last.

import { feedKey, ranChecks, type RunRecord } from '../history/readHistory.js';
import { terminalText as shown } from '../common/terminalText.js';

const num = (v: number | null, digits = 0): string => (v === null ? '-' : v.toFixed(digits));

export function historyText(rows: RunRecord[]): string {
  if (rows.length === 0) return 'no runs recorded yet\n';
  const header = [
    'run date',
    'command',
    'feed version',
    'hash',
    'median gap m',
    'close',
    'wide',
    'pax-min lost/day',
    'errors',
    'warnings',
    'findings',
  ];
  const body = rows.map((r) => [
    r.runDate,
    r.command,
    shown(r.feed.version ?? '') || '-',
    r.feed.contentHash.slice(0, 8),
    num(r.headline.medianGapM, 1),
    num(r.headline.closeStops),
    num(r.headline.wideGaps),
    num(r.headline.paxMinLostPerDay),
    ranChecks(r) ? String(r.severities.error) : '-',
    ranChecks(r) ? String(r.severities.warning) : '-',
    ranChecks(r) ? String(Object.values(r.findings).reduce((a, b) => a + b, 0)) : '-',
  ]);
  const widths = header.map((h, i) => Math.max(h.length, ...body.map((b) => b[i].length)));
  const line = (cells: string[]) =>
    cells
      .map((c, i) => (i < 4 ? c.padEnd(widths[i]) : c.padStart(widths[i])))
      .join('  ')
      .trimEnd();
  return [line(header), ...body.map(line), ...changeLines(rows)].join('\n') + '\n';
}

const HEADLINE: [string, keyof RunRecord['headline'], number][] = [
  ['patterns', 'patterns', 0],
  ['stops served', 'stops', 0],
  ['trips per day', 'trips', 0],
  ['median gap m', 'medianGapM', 1],
  ['close stops', 'closeStops', 0],
  ['wide gaps', 'wideGaps', 0],
  ['pax-min lost per day', 'paxMinLostPerDay', 0],
];

/** What changed since the previous run of the same feed: the feed's content, the headline figures and each finding's count. */
function changeLines(rows: RunRecord[]): string[] {
  if (rows.length < 2) return [];
  const b = rows[rows.length - 1];
  const a = rows
    .slice(0, -1)
    .reverse()
    .find((r) => feedKey(r) === feedKey(b) && r.command === b.command);
  if (!a) return [];
  const out: string[] = [];
  out.push('');
  out.push(
    `since the previous run (${a.runDate}): ${a.feed.contentHash === b.feed.contentHash ? 'same feed content' : 'new feed content'}`,
  );
  for (const [label, key, digits] of HEADLINE) {
    const x = a.headline[key];
    const y = b.headline[key];
    if (typeof x !== 'number' || typeof y !== 'number' || x.toFixed(digits) === y.toFixed(digits)) continue;
    const d = y - x;
    out.push(`  ${label} ${num(x, digits)} -> ${num(y, digits)} (${d > 0 ? '+' : ''}${d.toFixed(digits)})`);
  }
  const figures = out.length;
  const codes = [...new Set([...Object.keys(a.findings), ...Object.keys(b.findings)])].sort();
  for (const code of codes) {
    const d = (b.findings[code] ?? 0) - (a.findings[code] ?? 0);
    if (d !== 0) out.push(`  ${code} ${d > 0 ? '+' : ''}${d} (now ${b.findings[code] ?? 0})`);
  }
  if (out.length === 2) out.push('  no figure and no finding changed');
  else if (out.length === figures && ranChecks(b)) out.push('  no finding changed its count');
  return out;
}
