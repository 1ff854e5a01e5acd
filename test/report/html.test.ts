// index.html as text (the browser test covers behaviour): feed text escaped for element and attribute
// contexts, the data block cannot close its script, nothing refers to the network, the cautions and
// the assumed-demand labels are present, imperial units, and the histogram counts every gap.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CAUTIONS } from '../../src/report/cautions.js';
import { escapeHtml, jsonForScript } from '../../src/common/escapeHtml.js';
import { histogramSvg } from '../../src/report/html/histogramSvg.js';
import type { GapVerdict } from '../../src/audit/types.js';
import { indexHtml } from '../../src/report/html/indexHtml.js';
import { HOSTILE_NAMES, makeEmptyResult, makeSampleResult } from './sampleResult.js';

const sample = makeSampleResult();
const html = indexHtml(sample);
const dataStart = html.indexOf('<script type="application/json" id="report-data">');
const markupOnly = html.slice(0, dataStart); // everything rendered on the server side

describe('escaping', () => {
  it('escapes the five characters HTML gives meaning to, for text and quoted attributes', () => {
    // HTML Living Standard, "serializing HTML fragments" escapes & < > in text and " in attributes [M, from memory];
    // ' is escaped as well so single-quoted attributes are safe too
    expect(escapeHtml(`<img src=x onerror="a('1')">&`)).toBe('&lt;img src=x onerror=&quot;a(&#39;1&#39;)&quot;&gt;&amp;');
    fc.assert(
      fc.property(fc.string({ unit: 'grapheme' }), (s) => {
        const e = escapeHtml(s);
        expect(e).not.toMatch(/[<>"']/);
        // decoding the five entities gives the text back
        expect(
          e
            .replace(/&lt;/g, '<')
            .replace(/&gt;/g, '>')
            .replace(/&quot;/g, '"')
            .replace(/&#39;/g, "'")
            .replace(/&amp;/g, '&'),
        ).toBe(s);
      }),
    );
  });

  it('embeds JSON that no "</script>" or "<!--" can break, and that parses back unchanged', () => {
    fc.assert(
      fc.property(fc.jsonValue(), fc.string(), (v, s) => {
        const text = jsonForScript({ v, s: s + '</script><!--' });
        expect(text).not.toMatch(/</);
        expect(JSON.parse(text)).toEqual(JSON.parse(JSON.stringify({ v, s: s + '</script><!--' })));
      }),
    );
  });
});

describe('index.html', () => {
  it('holds feed text only escaped outside the data block', () => {
    expect(markupOnly).not.toContain(HOSTILE_NAMES.img);
    expect(markupOnly).toContain(escapeHtml(HOSTILE_NAMES.img)); // the top candidate in the headline
    expect(markupOnly).toContain('Vellmoor Transit &amp; &quot;Ferries&quot;');
    expect(markupOnly).toContain('2026-11 &lt;draft&gt;');
    expect(markupOnly).not.toMatch(/<img|onerror=alert\(3\)>|<i>Express/);
    expect(html.match(/<script/g)?.length).toBe(2);
    expect(html.match(/<\/script/g)?.length).toBe(2);
    // the parameter note appears in a title attribute's neighbour cell, escaped
    expect(markupOnly).toContain('P = 1 - exp(-λ) &lt;Poisson&gt;');
  });

  it('refers to nothing on the network: no src, href, url() or @import to another origin', () => {
    expect(html).not.toMatch(/\s(src|href|action|poster)\s*=\s*["']?\s*(https?:)?\/\//i);
    expect(html).not.toMatch(/url\(|@import|<link|<iframe|<object|<embed/i);
    expect(html).toContain("default-src 'none'"); // the page's own policy forbids fetching anything
  });

  it('shows the cautions and labels figures from assumed demand', () => {
    for (const c of CAUTIONS) expect(markupOnly).toContain(escapeHtml(c));
    expect(markupOnly).toMatch(/field review of the walk \(crossings, sidewalks, grades, lighting\)/);
    expect(markupOnly).toMatch(/ADA/);
    expect(markupOnly).toMatch(/Title VI/);
    expect(markupOnly).toMatch(
      /Passenger-minutes at stake per day<\/div><div class="v">[\d,]+<\/div><div class="s">[^<]*by removals[^<]*by the proposed additions <span class="badge assumed">assumed<\/span>/,
    );
    expect(markupOnly).toContain('net passenger-min/day (assumed)');
    const observed = indexHtml({ ...sample, demandSource: 'observed' });
    expect(observed).not.toContain('net passenger-min/day (assumed)');
    expect(observed).toContain('observed demand');
  });

  it('shows feet for people with units imperial, metres otherwise', () => {
    const imp = indexHtml(sample, { units: 'imperial' });
    const head = (s: string): string => s.slice(s.indexOf('id="headline"'), s.indexOf('id="cautions"'));
    expect(head(imp)).toMatch(/<div class="v">[\d,]+ ft<\/div>/);
    expect(head(imp)).not.toMatch(/\d m\b/);
    expect(head(html)).toMatch(/<div class="v">[\d,]+ m<\/div>/);
    expect(imp).toContain('"units":"imperial"');
  });

  it("draws a histogram whose bars count every gap, with the band, split by the gaps' own verdicts", () => {
    const gapsM = [50, 120, 180, 240, 260, 310, 420, 990, 2500, 5000];
    // 420 m is above this band but served by a local; 5 000 m an express stretch: neither is wide
    const verdicts: GapVerdict[] = ['short', 'short', 'short', 'ok', 'ok', 'ok', 'local', 'wide', 'wide', 'express'];
    const svg = histogramSvg({ gapsM, verdicts, bandLowM: 200, bandHighM: 380, optimalM: 270, medianGapM: 285 }, 'metric');
    const counts = [...svg.matchAll(/: (\d+) gaps<\/title>/g)].map((m) => Number(m[1]));
    expect(counts.reduce((a, b) => a + b, 0)).toBe(gapsM.length);
    expect(svg).toContain('near-optimal band 200 m to 380 m');
    expect(svg.match(/class="bar close"/g)?.length).toBe(3); // bins 50-100, 100-150, 150-200: all below 200 m
    expect(svg).toContain('or more: 2 gaps'); // the overflow bar holds 2 500 and 5 000 m
    // the blue parts are the gaps judged wide, no more: 990 m and 2 500 m
    const wide = [...svg.matchAll(/: (\d+) wide<\/title>/g)].map((m) => Number(m[1]));
    expect(wide.reduce((a, b) => a + b, 0)).toBe(2);
    expect(svg.match(/class="bar wide"/g)?.length).toBe(2);
  });

  it('stays a few MB for a large network (160 patterns, 3 000+ stop rows)', () => {
    const big = makeSampleResult({ patterns: 160, stopsPerPattern: 22 });
    expect(big.stops.length).toBeGreaterThan(3000);
    const text = indexHtml(big);
    expect(Buffer.byteLength(text)).toBeLessThan(4 * 1024 * 1024);
    expect(text.match(/<details/g)).toBeNull(); // per-pattern sections are built by the script when the page opens
  });

  it('renders a result with nothing in it', () => {
    const text = indexHtml(makeEmptyResult());
    expect(text).toContain('No stop change saves riders time under these parameters.');
    expect(text).toContain('The feed was read without warnings.');
    for (const c of CAUTIONS) expect(text).toContain(escapeHtml(c));
  });
});

describe('additions and removals on the page', () => {
  it('ranks removals and additions in separate lists, each addition with its evidence, and lists the gaps to review', () => {
    const removeAt = html.indexOf('<h4>Stops to remove</h4>');
    const addAt = html.indexOf('<h4>Stops to add</h4>');
    expect(removeAt).toBeGreaterThan(0);
    expect(addAt).toBeGreaterThan(removeAt);
    const removals = html.slice(removeAt, addAt);
    const additions = html.slice(addAt, html.indexOf('</section>', addAt));
    expect(removals).toContain('<li>Remove ');
    expect(removals).not.toContain('Add a stop');
    expect(additions).toContain('<li>Add a stop ');
    expect(additions).not.toContain('<li>Remove ');
    expect(additions).toContain('(evidence: 2 stops of route &lt;b&gt;&amp;amp; within a walk of the site)');
    const review = html.slice(html.indexOf('<h3>Wide gaps to review</h3>'));
    expect(review).toContain('<td>between &lt;Quay&gt; &amp; &quot;Bridge&quot;</td>');
    expect(review).toContain('a long straight run with no stop of another route');
  });

  it('marks the gap listed for review as an empty stretch in the page data, the other wide gaps not', () => {
    const g = sample.reviewGaps[0];
    expect(g).toBeDefined();
    const data = JSON.parse(html.slice(html.indexOf('>', dataStart) + 1, html.indexOf('</script>', dataStart))) as {
      patterns: { id: string; gaps: [number, number, number][] }[];
    };
    const marks = data.patterns.flatMap((p) => p.gaps.map((x) => [p.id, x[2]] as [string, number]));
    expect(marks.filter(([, m]) => m === 2)).toEqual([[g.patternIds[0], 2]]);
    expect(marks.filter(([, m]) => m === 1).length).toBeGreaterThan(0);
  });
});

describe('the page data for the maps', () => {
  type Data = {
    stopTable: [string, string, number, number][];
    patterns: { id: string; stops: (number | string)[][]; cands: [number, number][]; drops: number[]; path: number[] }[];
    candidates: { rank: number; pats: number[]; at?: [number, number] }[];
  };
  const data = JSON.parse(html.slice(html.indexOf('>', dataStart) + 1, html.indexOf('</script>', dataStart))) as Data;
  const stopId = (p: Data['patterns'][number], i: number): string => data.stopTable[p.stops[i][0] as number][0];

  it("writes each stop once, and each pattern's candidates and the optimiser's drops at the stops the audit names", () => {
    expect(data.stopTable.length).toBe(new Set(sample.stops.map((s) => s.stopId)).size);
    data.patterns.forEach((p, pi) => {
      const result = sample.stops.filter((s) => s.patternId === p.id).sort((a, b) => a.stopIndex - b.stopIndex);
      expect(p.stops.map((_, i) => stopId(p, i))).toEqual(result.map((s) => s.stopId));
      expect(p.drops).toEqual(result.flatMap((s, i) => (s.keptByOptimiser ? [] : [i])));
      const on = sample.candidates.filter((c) => c.patternIds.includes(p.id));
      expect(p.cands.length).toBe(on.length);
      for (const [ci, at] of p.cands) {
        const c = sample.candidates[ci];
        expect(data.candidates[ci].pats).toContain(pi);
        if (c.action === 'remove') expect(stopId(p, at)).toBe(c.stopId);
        else {
          expect([stopId(p, at), stopId(p, at + 1)]).toEqual([c.fromStopId, c.toStopId]);
          expect(data.candidates[ci].at).toEqual([Math.round(c.lat * 1e5) / 1e5, Math.round(c.lon * 1e5) / 1e5]);
        }
      }
    });
  });

  it('writes a path as steps of 1e-5 degrees that add back up to the points within rounding', () => {
    const p = sample.patterns[0];
    const steps = data.patterns[0].path;
    const back: [number, number][] = [];
    for (let i = 0, x = 0, y = 0; i + 1 < steps.length; i += 2) back.push([(x += steps[i]) / 1e5, (y += steps[i + 1]) / 1e5]);
    expect(back.length).toBe(Math.min(p.path.length, 400));
    back.forEach(([lon, lat], i) => {
      expect(Math.abs(lon - p.path[i][0])).toBeLessThanOrEqual(0.5e-5 + 1e-9);
      expect(Math.abs(lat - p.path[i][1])).toBeLessThanOrEqual(0.5e-5 + 1e-9);
    });
  });
});
