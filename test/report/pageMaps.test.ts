// The per-pattern part of the HTML report in a real browser (Debian's chromium through playwright-core):
// the audit's candidates and the optimiser's plan marked on each pattern's map and strip, each mark named
// for screen readers and labelled with its rank; and the navigation a large network needs: a filter by
// route or name that leaves only the matching sections, an index of routes, sections made in chunks, and
// candidate links and #p- addresses that reach a pattern whose chunk was not made yet.

import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { BrowserContext, Page } from 'playwright-core';
import { CHROMIUM, haveChromium, launchChromium } from '../helpers/browser.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeReport } from '../../src/report/writeReport.js';
import { makeSampleResult } from './sampleResult.js';

if (!haveChromium) console.warn(`pattern map tests skipped: ${CHROMIUM} is absent`);

describe.skipIf(!haveChromium)('pattern maps and navigation in chromium', () => {
  let browser: BrowserContext;
  let work: string;
  const sample = makeSampleResult();
  const big = makeSampleResult({ patterns: 450, stopsPerPattern: 8 });

  beforeAll(async () => {
    work = await mkdtemp(join(tmpdir(), 'stopspan-maps-'));
    browser = await launchChromium(join(work, 'profile'));
    await writeReport(sample, join(work, 'sample'), { formats: ['html'] });
    await writeReport(big, join(work, 'big'), { formats: ['html'] });
  });
  afterAll(async () => {
    await browser?.close();
    if (work) await rm(work, { recursive: true, force: true });
  });

  async function open(folder: string, hash = ''): Promise<{ page: Page; errors: string[] }> {
    const page = await browser.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(pathToFileURL(join(work, folder, 'index.html')).href + hash);
    await page.waitForSelector('html[data-ready="1"]');
    return { page, errors };
  }
  const sectionIds = (page: Page) => page.$$eval('#pattern-sections > details.pattern', (ds) => ds.map((d) => d.id.slice(2)));

  it("marks each candidate on its pattern's map and strip, named and labelled with its rank, and the plan's drops apart", async () => {
    const { page, errors } = await open('sample');
    const p = sample.patterns[0];
    const cands = sample.candidates.filter((c) => c.patternIds.includes(p.patternId));
    const removals = cands.filter((c) => c.action === 'remove');
    const additions = cands.filter((c) => c.action === 'add');
    expect(removals.length).toBeGreaterThan(0);
    expect(additions.length).toBeGreaterThan(0);
    const stops = sample.stops.filter((s) => s.patternId === p.patternId);
    const dropped = stops.filter((s) => !s.keptByOptimiser).length;
    expect(dropped).toBeGreaterThan(0);
    expect(dropped).toBeLessThan(stops.length);

    await page.click(`[id="p-${p.patternId}"] > summary`);
    await page.waitForSelector(`[id="p-${p.patternId}"] svg.map`);
    const sec = page.locator(`[id="p-${p.patternId}"]`);
    const labels = async (where: string) =>
      sec.locator(`svg.${where} g.cand`).evaluateAll((gs) => gs.map((g) => g.getAttribute('aria-label') ?? ''));
    for (const where of ['map', 'strip']) {
      const named = await labels(where);
      expect(named.filter((l) => /^Candidate #\d+: remove /.test(l)).length, where).toBe(removals.length);
      expect(named.filter((l) => /^Candidate #\d+: add a stop /.test(l)).length, where).toBe(additions.length);
    }
    // the best candidate on the pattern: its mark on the map carries its rank as text and its name
    const best = [...cands].sort((a, b) => a.rank - b.rank)[0];
    const mark = sec.locator(`svg.map g.cand[data-rank="${best.rank}"]`);
    expect(await mark.locator('text').textContent()).toBe(`#${best.rank}`);
    const name = (await mark.getAttribute('aria-label')) ?? '';
    expect(name).toContain(`Candidate #${best.rank}: `);
    expect(name).toContain(best.stopName);
    expect(await mark.getAttribute('tabindex')).toBe('0');
    // keyboard focus shows its words, as a stop's does
    await mark.focus();
    expect(await sec.locator('.info').textContent()).toBe(name);
    // the optimiser's plan: a cross on each dropped stop (map and strip), a bar for each kept one in the strip's plan row
    expect(await sec.locator('svg.map path.plan-drop').count()).toBe(dropped);
    expect(await sec.locator('svg.strip path.plan-drop').count()).toBe(dropped);
    expect(await sec.locator('svg.strip path.plan-keep').count()).toBe(stops.length - dropped);
    // and in words: the legend, the list of candidates, the stop table's plan column
    const legend = (await sec.locator('.legend').textContent()) ?? '';
    expect(legend).toContain('candidate: remove this stop');
    expect(legend).toContain('candidate: add a stop here');
    expect(legend).toContain('plan drops the stop');
    expect(await sec.locator('.pat-cands li').count()).toBe(cands.length);
    const planCells = await sec.locator('details.stop-list tbody tr').evaluateAll((rows) => rows.map((r) => r.children[10].textContent));
    expect(planCells.filter((c) => c === 'drops').length).toBe(dropped);
    // candidate and plan marks take colours apart from the verdicts' and from each other
    const colours = await page.evaluate(() => {
      const probe = (cls: string, prop: 'stroke' | 'fill') => {
        const svg = document.createElementNS('http://www.w3.org/2000/svg', 'svg');
        const e = document.createElementNS('http://www.w3.org/2000/svg', 'path');
        e.setAttribute('class', cls);
        svg.appendChild(e);
        document.body.appendChild(svg);
        const v = getComputedStyle(e)[prop];
        svg.remove();
        return v;
      };
      return {
        ring: probe('cand-ring', 'stroke'),
        drop: probe('plan-drop', 'stroke'),
        keep: probe('plan-keep', 'stroke'),
        close: probe('mk-close', 'fill'),
        wide: probe('mk-wide', 'fill'),
      };
    });
    expect(new Set(Object.values(colours)).size).toBe(5);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('names every box that scrolls apart, also two in one section (axe-core landmark-unique)', async () => {
    const { page } = await open('sample');
    await page.click('details.pattern > summary');
    await page.waitForSelector('details.pattern[open] svg.map');
    const names = await page.$$eval('[role="region"]', (rs) => rs.map((r) => r.getAttribute('aria-label')));
    expect(await page.locator('#candidates [role="region"]').count()).toBe(2); // the candidates and the gaps to review
    expect(new Set(names).size).toBe(names.length);
    await page.close();
  });

  it('makes a large list of pattern sections in chunks, and a filter by route name leaves only its sections', async () => {
    const { page, errors } = await open('big');
    expect(await page.locator('#pattern-sections > details.pattern').count()).toBe(200);
    expect(await page.textContent('#pat-find-count')).toBe('Showing 200 of 450 matching patterns (450 in all).');
    // the button adds a chunk; scrolling to the end of the list brings the rest
    await page.click('#pattern-detail button.show-more');
    expect(await page.locator('#pattern-sections > details.pattern').count()).toBeGreaterThanOrEqual(400);
    await page.evaluate(() => document.getElementById('pattern-sections')!.lastElementChild!.scrollIntoView());
    await expect.poll(() => page.locator('#pattern-sections > details.pattern').count(), { timeout: 5000 }).toBe(450);
    expect(await page.locator('#pattern-detail button.show-more').isHidden()).toBe(true);

    // a route's name typed in full: that route's sections only (route "1", not "10" or "100")
    await page.fill('#pat-find', '1');
    const route1 = big.patterns.filter((p) => p.routeShortName === '1').map((p) => p.patternId);
    expect(big.patterns.some((p) => p.routeShortName !== '1' && p.routeShortName.includes('1'))).toBe(true);
    expect((await sectionIds(page)).sort()).toEqual(route1.sort());
    const other = big.patterns[300];
    await page.fill('#pat-find', other.routeShortName);
    expect((await sectionIds(page)).sort()).toEqual(
      big.patterns
        .filter((p) => p.routeShortName === other.routeShortName)
        .map((p) => p.patternId)
        .sort(),
    );
    // part of a headsign: every pattern whose headsign holds it
    await page.fill('#pat-find', 'vellmoor central');
    const byHeadsign = big.patterns.filter((p) => p.headsign.toLowerCase().includes('vellmoor central')).map((p) => p.patternId);
    expect(byHeadsign.length).toBeGreaterThan(1);
    expect((await sectionIds(page)).sort()).toEqual(byHeadsign.sort());
    await page.fill('#pat-find', 'no such route');
    expect(await sectionIds(page)).toEqual([]);
    expect(await page.textContent('#pat-find-count')).toBe('Showing 0 of 0 matching patterns (450 in all).');

    // the index of routes: a route's link lists that route's sections
    await page.fill('#pat-find', '');
    await page.click('#route-index summary');
    const link = page.locator('#route-index nav a', { hasText: /^7 <i>Express<\/i> \(R7<b>\)$/ });
    await link.click();
    expect(await sectionIds(page)).toEqual(big.patterns.filter((p) => p.routeId === 'R7<b>').map((p) => p.patternId));
    expect(errors).toEqual([]);
    await page.close();
  });

  it('opens a pattern whose chunk was not made yet, from a candidate row and from a #p- address', async () => {
    const { page, errors } = await open('big');
    // a candidate row whose pattern's section does not exist yet
    const target = await page.evaluate(() => {
      const links = Array.from(document.querySelectorAll('#cand-table a.pat-link'));
      const a = links.find((l) => !document.getElementById(decodeURIComponent(l.getAttribute('href')!.slice(1))));
      if (!a) return null;
      a.setAttribute('data-probe', '1');
      return a.getAttribute('href')!.slice(3);
    });
    expect(target).not.toBeNull();
    await page.click('a[data-probe="1"]');
    await page.waitForSelector(`[id="p-${target}"][open] svg.map`);
    expect(
      await page.evaluate((id) => document.activeElement === document.getElementById('p-' + id)!.querySelector('summary'), target),
    ).toBe(true);
    await page.close();

    // the pattern with the fewest passenger-minutes lost comes last in the list: far beyond the first chunk
    const last = [...big.patterns].sort((a, b) => a.paxMinLostPerDay - b.paxMinLostPerDay)[0].patternId;
    const second = await open('big', `#p-${encodeURIComponent(last)}`);
    await second.page.waitForSelector(`[id="p-${last}"][open] svg.strip`);
    expect(await second.page.locator('#pattern-sections > details.pattern').count()).toBeGreaterThan(200);
    expect(errors).toEqual([]);
    expect(second.errors).toEqual([]);
    await second.page.close();
  });
});
