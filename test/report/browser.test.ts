// The HTML report in a real browser (Debian's chromium through playwright-core): it loads from file://
// with no console errors and no network requests, the candidate and pattern tables sort and filter
// (also from the keyboard), feed text holding markup renders literally and runs nothing, a screenshot
// is not blank, the imperial page shows feet, and a large network stays small and usable.

import { mkdtemp, rm, stat, writeFile, mkdir } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { CHROMIUM, haveChromium, launchChromium } from '../helpers/browser.js';
import { writeReport } from '../../src/report/writeReport.js';
import { HOSTILE_NAMES, makeEmptyResult, makeSampleResult } from './sampleResult.js';
import { looksDrawn, pngStats } from './pngCheck.js';

if (!haveChromium) console.warn(`browser tests skipped: ${CHROMIUM} is absent (apt-get install chromium)`);

interface Visit {
  page: Page;
  consoleErrors: string[];
  offlineRequests: string[];
  dialogs: string[];
}

describe.skipIf(!haveChromium)('the HTML report in chromium', () => {
  let browser: BrowserContext; // one persistent context on a fresh profile folder
  let work: string;
  const pages: Page[] = [];
  const sample = makeSampleResult();

  async function visit(htmlPath: string, viewport = { width: 1280, height: 900 }): Promise<Visit> {
    const page = await browser.newPage();
    pages.push(page);
    await page.setViewportSize(viewport);
    const v: Visit = { page, consoleErrors: [], offlineRequests: [], dialogs: [] };
    await page.route('**/*', async (route) => {
      const url = route.request().url();
      if (url.startsWith('file:')) await route.continue();
      else {
        v.offlineRequests.push(url);
        await route.abort();
      }
    });
    v.page.on('console', (m) => {
      if (m.type() === 'error') v.consoleErrors.push(m.text());
    });
    v.page.on('pageerror', (e) => v.consoleErrors.push(String(e)));
    v.page.on('dialog', async (d) => {
      v.dialogs.push(d.message());
      await d.dismiss();
    });
    await v.page.goto(pathToFileURL(htmlPath).href);
    await v.page.waitForSelector('html[data-ready="1"]');
    return v;
  }

  async function columnTexts(page: Page, tableId: string, col: number): Promise<string[]> {
    return page.$$eval(`#${tableId} tbody tr`, (rows, c) => rows.map((r) => (r.children[c] as HTMLElement).textContent ?? ''), col);
  }
  const parseNum = (s: string): number => Number(s.replace(/[+,]/g, '').replace('–', 'NaN'));

  beforeAll(async () => {
    work = await mkdtemp(join(tmpdir(), 'stopspan-browser-'));
    browser = await launchChromium(join(work, 'profile'));
    await writeReport(sample, join(work, 'metric'), { formats: ['html'] });
    await writeReport(sample, join(work, 'imperial'), { formats: ['html'], units: 'imperial' });
  });

  afterAll(async () => {
    for (const p of pages) await p.close();
    await browser?.close();
    if (work) await rm(work, { recursive: true, force: true });
  });

  it('loads from file:// with no console errors and no network requests', async () => {
    const v = await visit(join(work, 'metric', 'index.html'));
    expect(v.consoleErrors).toEqual([]);
    expect(v.offlineRequests).toEqual([]);
    expect(await v.page.locator('#cand-table tbody tr').count()).toBe(sample.candidates.length);
    expect(await v.page.locator('#pat-table tbody tr').count()).toBe(sample.patterns.length);
    expect(await v.page.locator('#curve-host svg path.curve').count()).toBe(1);
    expect(await v.page.locator('#cautions li').count()).toBeGreaterThanOrEqual(5);
  });

  it('sorts the candidate table by clicking a heading, and from the keyboard', async () => {
    const { page } = await visit(join(work, 'metric', 'index.html'));
    const expectedAsc = sample.candidates.map((c) => Math.round(c.netPaxMinPerDay * 10) / 10).sort((a, b) => a - b);
    expect((await columnTexts(page, 'cand-table', 4)).map(parseNum)).toEqual(expectedAsc); // default: biggest saving first
    await page.click('#cand-table th[data-key="net"] button');
    expect((await columnTexts(page, 'cand-table', 4)).map(parseNum)).toEqual([...expectedAsc].reverse());
    expect(await page.getAttribute('#cand-table th[data-key="net"]', 'aria-sort')).toBe('descending');
    // keyboard: focus the "riders affected" heading and press Enter
    await page.focus('#cand-table th[data-key="riders"] button');
    await page.keyboard.press('Enter');
    const riders = (await columnTexts(page, 'cand-table', 5)).map(parseNum);
    const expectedRiders = sample.candidates.map((c) => Math.round(c.ridersAffectedPerDay)).sort((a, b) => b - a);
    expect(riders).toEqual(expectedRiders);
    // text column: stop names ascending
    await page.click('#cand-table th[data-key="stop"] button');
    const names = await columnTexts(page, 'cand-table', 2);
    expect(names).toEqual([...names].sort((a, b) => a.localeCompare(b, 'en', { numeric: true })));
    expect(names.length).toBe(sample.candidates.length);
  });

  it('filters the candidate table by route, action and text, and the pattern table by verdict', async () => {
    const { page } = await visit(join(work, 'metric', 'index.html'));
    const route = 'R7<b>';
    await page.selectOption('#cand-route', route);
    const want = sample.candidates.filter((c) => c.routeIds.includes(route)).length;
    expect(want).toBeGreaterThan(0);
    expect(want).toBeLessThan(sample.candidates.length);
    const routesShown = await columnTexts(page, 'cand-table', 3);
    expect(routesShown.length).toBe(want);
    expect(routesShown.every((r) => r.includes('7 <i>Express</i>'))).toBe(true);
    await page.selectOption('#cand-route', '');
    await page.selectOption('#cand-action', 'add');
    const actions = await columnTexts(page, 'cand-table', 1);
    expect(actions.length).toBe(sample.candidates.filter((c) => c.action === 'add').length);
    expect(new Set(actions)).toEqual(new Set(['add']));
    await page.selectOption('#cand-action', '');
    await page.fill('#cand-search', 'brückenplatz');
    expect(await page.locator('#cand-table tbody tr').count()).toBe(
      sample.candidates.filter((c) => c.stopName.toLowerCase().includes('brückenplatz')).length,
    );
    await page.selectOption('#pat-verdict', 'wide');
    expect(await page.locator('#pat-table tbody tr').count()).toBe(sample.patterns.filter((p) => p.wideGaps > 0).length);
    expect(await page.textContent('#pat-count')).toMatch(/^Showing \d+ of \d+ matching/);
  });

  it('renders markup in feed text literally and runs nothing', async () => {
    const v = await visit(join(work, 'metric', 'index.html'));
    const { page } = v;
    // open every pattern so the lazily drawn strips and maps (with stop names in <title>) exist
    await page.$$eval('details.pattern', (ds) => ds.forEach((d) => ((d as HTMLDetailsElement).open = true)));
    await page.waitForFunction(
      () => document.querySelectorAll('details.pattern svg.strip').length === document.querySelectorAll('details.pattern').length,
    );
    const probe = await page.evaluate(() => ({
      imgs: document.querySelectorAll('img').length,
      onerror: document.querySelectorAll('[onerror]').length,
      scripts: document.querySelectorAll('script').length,
      italics: document.querySelectorAll('i, b').length,
      titles: Array.from(document.querySelectorAll('svg title')).map((t) => t.textContent ?? ''),
      stopCells: Array.from(document.querySelectorAll('details.stop-list td')).map((t) => t.textContent ?? ''),
      text: document.body.innerText,
      docTitle: document.title,
    }));
    expect(probe.imgs).toBe(0);
    expect(probe.onerror).toBe(0);
    expect(probe.scripts).toBe(2); // the data block and the page script, nothing injected
    expect(probe.italics).toBe(0); // "7 <i>Express</i>" and "R7<b>" stayed text
    const hostileCandidate = sample.candidates.find((c) => c.stopName === HOSTILE_NAMES.img);
    expect(hostileCandidate?.rank).toBeLessThanOrEqual(5); // so it is in the server-rendered headline too
    expect(await page.textContent('#headline')).toContain(HOSTILE_NAMES.img);
    expect(probe.text).toContain(HOSTILE_NAMES.img); // in the candidate table, drawn by the script
    expect(probe.text).toContain('trips without a shape <img src=x onerror=alert(3)> used straight lines'); // warnings
    expect(probe.text).toContain('7 <i>Express</i>');
    expect(probe.titles.some((t) => t.includes(HOSTILE_NAMES.script))).toBe(true);
    expect(probe.titles.some((t) => t.includes(HOSTILE_NAMES.quotes))).toBe(true);
    expect(probe.stopCells).toContain(HOSTILE_NAMES.script); // the per-pattern stop list, as plain text
    expect(probe.stopCells).toContain(HOSTILE_NAMES.formula);
    expect(probe.docTitle).toContain('Vellmoor Transit & "Ferries"');
    expect(v.dialogs).toEqual([]);
    expect(v.consoleErrors).toEqual([]);
    expect(v.offlineRequests).toEqual([]);
  });

  it('takes a screenshot that is not blank (and a blank page fails the same check)', async () => {
    const v = await visit(join(work, 'metric', 'index.html'));
    await v.page.click('details.pattern > summary'); // open the first pattern so a map and strip show
    const shot = await v.page.screenshot({ fullPage: true });
    const stats = pngStats(shot);
    expect(stats.width).toBe(1280);
    expect(looksDrawn(stats)).toBe(true);
    const blankPath = join(work, 'blank.html');
    await writeFile(blankPath, '<!doctype html><html><body style="background:#fff"></body></html>');
    const blank = await browser.newPage();
    pages.push(blank);
    await blank.setViewportSize({ width: 400, height: 300 });
    await blank.goto(pathToFileURL(blankPath).href);
    expect(looksDrawn(pngStats(await blank.screenshot()))).toBe(false);
    const keep = process.env.STOPSPAN_SHOTS; // set to a folder to keep the screenshots for a person to look at
    if (keep) {
      await mkdir(keep, { recursive: true });
      await writeFile(join(keep, 'report-full.png'), shot);
      await writeFile(join(keep, 'report-top.png'), await v.page.screenshot({ fullPage: false }));
      for (const id of ['headline', 'cautions', 'gaps', 'curve', 'candidates', 'patterns', 'parameters', 'warnings']) {
        await writeFile(join(keep, `report-${id}.png`), await v.page.locator(`#${id}`).screenshot());
      }
      await writeFile(join(keep, 'report-pattern.png'), await v.page.locator('details.pattern').first().screenshot());
      await v.page.evaluate(() => window.scrollTo(0, 0));
      await writeFile(
        join(keep, 'report-overview.png'),
        await v.page.screenshot({ fullPage: true, clip: { x: 0, y: 0, width: 1280, height: 2300 } }),
      );
      await writeFile(join(keep, 'report-top.png'), await v.page.screenshot({ fullPage: false }));
    }
  });

  it('loads a report with nothing in it without errors', async () => {
    const out = join(work, 'empty');
    await writeReport(makeEmptyResult(), out, { formats: ['html'] });
    const v = await visit(join(out, 'index.html'));
    expect(v.consoleErrors).toEqual([]);
    expect(await v.page.textContent('#cand-count')).toBe('Showing 0 of 0 matching (0 in all).');
  });

  it('shows feet and miles with units imperial', async () => {
    const v = await visit(join(work, 'imperial', 'index.html'));
    expect(v.consoleErrors).toEqual([]);
    const headline = await v.page.textContent('#headline');
    expect(headline).toMatch(/\d ft/);
    expect(headline).not.toMatch(/\d m\b/);
    expect(await v.page.textContent('#gaps svg')).toContain('(ft)');
    await v.page.click('details.pattern > summary');
    const facts = await v.page.textContent('details.pattern .kv');
    expect(facts).toMatch(/\d+(\.\d)? mi/);
    // the sample pattern cruises at 8.2 m/s = 18.3 mph (1 mph = 0.44704 m/s exactly, NIST SP 811), with
    // 120 s of traffic delay per trip and Poisson stopping
    expect(facts).toContain('18 mph');
    expect(facts).toContain('2.0 min');
    expect(facts).toContain('where riders board or alight (Poisson)');
  });

  it('keeps a large network (160 patterns, 3 000+ stop rows) to a few MB and usable', async () => {
    const big = makeSampleResult({ patterns: 160, stopsPerPattern: 22 });
    expect(big.stops.length).toBeGreaterThan(3000);
    const out = join(work, 'big');
    await writeReport(big, out, { formats: ['html'] });
    const size = (await stat(join(out, 'index.html'))).size;
    expect(size).toBeLessThan(4 * 1024 * 1024);
    const v = await visit(join(out, 'index.html'));
    expect(v.consoleErrors).toEqual([]);
    expect(await v.page.locator('details.pattern').count()).toBe(160);
    expect(await v.page.locator('details.pattern svg').count()).toBe(0); // nothing drawn until opened
    await v.page.locator('details.pattern > summary').nth(100).click();
    // drawn on the toggle event, which may come a moment after the click on a busy machine
    await v.page.waitForSelector('details.pattern svg.strip', { timeout: 10_000 });
    expect(await v.page.locator('details.pattern svg.strip').count()).toBe(1);
  });
});
