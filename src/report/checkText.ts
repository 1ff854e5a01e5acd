// The check report as plain text for people: one block per finding, most severe first, then a summary line.

import { terminalText as oneLine } from '../common/terminalText.js';
import type { CheckReport } from '../check/check.js';
import { CONTEXT_STATION_RADIUS_M } from '../network/contextStations.js';

export function checkText(report: CheckReport): string {
  const lines: string[] = [];
  const f = report.feed;
  lines.push(`feed ${oneLine(f.source)}${f.version ? ` (version ${oneLine(f.version)})` : ''}, sha256 ${f.contentHash.slice(0, 12)}`);
  lines.push(`run date ${report.today}; service runs until ${report.serviceEnd ?? 'never'}`);
  const a = report.analysis;
  const n = report.network;
  lines.push(
    a.date
      ? `patterns checked on ${a.date} (${oneLine(a.because)}): ${n.patterns} pattern(s), ${n.tripsPerDay} trips, ${n.stopsServed} stops served`
      : `no patterns checked: ${oneLine(a.because)}`,
  );
  const c = report.context;
  if (c) {
    const feeds = c.feeds
      .map((x) => `${oneLine(x.label)} (${x.stations} stations${x.servicesOnDate === 0 ? ', no service on the date' : ''})`)
      .join(', ');
    lines.push(
      `context ${feeds}: ${c.stopsNearStations} stop(s) served within ${CONTEXT_STATION_RADIUS_M} m of a station, transfer points the audit keeps`,
    );
    for (const e of c.examples) lines.push(`        ${oneLine(e.stopId)} ${oneLine(e.stopName)}: ${oneLine(e.station)}`);
    if (c.stopsNearStations > c.examples.length) lines.push(`        ... and ${c.stopsNearStations - c.examples.length} more`);
  }
  lines.push('');
  if (report.findings.length === 0) {
    lines.push('no findings');
  }
  for (const x of report.findings) {
    lines.push(`${x.severity.toUpperCase().padEnd(7)} ${x.code} (${x.count}): ${x.explanation}`);
    for (const e of x.examples) lines.push(`        ${e.file}${e.line !== undefined ? ':' + e.line : ''}  ${oneLine(e.detail)}`);
    if (x.count > x.examples.length) lines.push(`        ... and ${x.count - x.examples.length} more`);
  }
  const s = report.bySeverity;
  lines.push('');
  // kinds of finding at each severity (what --fail-on and the history count), then their occurrences
  const occurrences = report.findings.reduce((n, x) => n + x.count, 0);
  lines.push(`kinds of finding: ${s.error} error, ${s.warning} warning, ${s.info} info (${occurrences} finding(s) in all)`);
  return lines.join('\n') + '\n';
}
