// The text and HTML renderings of check reports and comparisons keep feed text inert.
import { describe, expect, it } from 'vitest';
import { checkFeed } from '../../src/check/check.js';
import { checkText } from '../../src/report/checkText.js';
import { compareFeeds } from '../../src/compare/compare.js';
import { comparisonHtml, comparisonText } from '../../src/report/compareRender.js';
import { buildFeed, cleanSpec } from '../helpers/buildFeed.js';

describe('renderers', () => {
  const hostile = '<img src=x onerror=alert(1)>\u001b[2J';
  const a = buildFeed(cleanSpec());
  const spec = cleanSpec();
  spec.stops[0].name = hostile;
  spec.stops.push({ id: 'Z0\u001b[31m', lat: 0, lon: 0, name: hostile });
  const b = buildFeed(spec);

  it('comparisonHtml escapes feed text and loads nothing', () => {
    const html = comparisonHtml(compareFeeds(a.feed, b.feed, a.patterns, b.patterns));
    expect(html).not.toContain('<img');
    expect(html).toContain('&lt;img src=x onerror=alert(1)&gt;');
    expect(html).not.toMatch(/<script|<link|src="/);
    expect(html).toContain('Stops renamed (1)');
  });

  it('comparisonText and checkText show control characters escaped', () => {
    const text = comparisonText(compareFeeds(a.feed, b.feed, a.patterns, b.patterns));
    expect(text).not.toContain('\u001b');
    expect(text).toContain('\\u001b[2J');
    const report = checkText(checkFeed(b.feed, b.patterns, { today: '2026-10-14' }));
    expect(report).not.toContain('\u001b');
    expect(report).toMatch(/ERROR\s+coordinate-fault \(1\)/);
    // the closing line counts kinds of finding by severity, as --fail-on does, and every occurrence beside them
    const checked = checkFeed(b.feed, b.patterns, { today: '2026-10-14' });
    const kinds = checked.bySeverity;
    const all = checked.findings.reduce((n, x) => n + x.count, 0);
    expect(checked.findings.length).toBe(kinds.error + kinds.warning + kinds.info);
    expect(report.trimEnd().split('\n').at(-1)).toBe(
      `kinds of finding: ${kinds.error} error, ${kinds.warning} warning, ${kinds.info} info (${all} finding(s) in all)`,
    );
  });
});
