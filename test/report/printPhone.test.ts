// The demo page of Vellmoor printed and on a phone, in a real browser (Debian's chromium through
// playwright-core): chromium's own PDF print stays short and opens with the page a planner takes to a
// meeting, no table runs off the page's right edge, filter controls do not print; at 375 px the page does
// not scroll sideways, chart labels keep at least 10 px, and every box that scrolls on its own is a named
// region a keyboard reaches; axe-core (an outside accessibility checker, run in the page) finds no serious or
// critical violation at either width.

import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { BrowserContext, Page } from 'playwright-core';
import { CHROMIUM, haveChromium, launchChromium } from '../helpers/browser.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditFeed } from '../../src/audit/auditFeed.js';
import { PAGE_STYLE } from '../../src/report/html/pageStyle.js';
import { writeReport } from '../../src/report/writeReport.js';
import { makeSampleResult } from './sampleResult.js';

const FEED = new URL('../../fixtures/demo/demo-feed.zip', import.meta.url).pathname;
const RIDERSHIP = new URL('../../fixtures/demo/ridership.csv', import.meta.url).pathname;
const ready = existsSync(CHROMIUM) && existsSync(FEED);
if (!ready) console.warn('print and phone tests skipped: /usr/bin/chromium or fixtures/demo is absent');

// A4 is 210 x 297 mm (ISO 216 [C]); at CSS's 96 px per inch (CSS Values 4 [C]) less the 11 and 12 mm
// margins of @page: 210 - 22 = 188 mm = 711 px wide, 297 - 24 = 273 mm = 1032 px high [D]
const PRINT_WIDTH_PX = Math.floor(((210 - 22) / 25.4) * 96);
const PRINT_HEIGHT_PX = Math.floor(((297 - 24) / 25.4) * 96);
/** axe-core's browser script (a devDependency), or null when it is not installed. */
function axeScript(): string | null {
  try {
    return readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
  } catch {
    return null;
  }
}
const AXE = axeScript();
if (!AXE) console.warn('axe-core checks skipped: axe-core is not installed (npm install)');
const MAX_DEMO_PAGES = 12; // measured 7 (45 before the print stylesheet)

describe('the print stylesheet', () => {
  it('hides the controls, starts the charts on page 2, wraps the tables and limits the long ones', () => {
    const print = PAGE_STYLE.slice(PAGE_STYLE.indexOf('@media print'));
    expect(print).toMatch(/@page \{ size:A4;/);
    expect(print).toMatch(/\.controls,[^{]*\{ display:none !important; \}/);
    expect(print).toMatch(/#gaps \{ break-before:page; \}/);
    expect(print).toMatch(/th, td \{[^}]*overflow-wrap:anywhere/);
    expect(print).toMatch(/#cand-table tbody tr:nth-child\(n\+41\)/);
    expect(print).toMatch(/details\.pattern:not\(\[open\]\) \{ display:none; \}/);
  });
});

describe.skipIf(!ready)('the demo page printed and on a phone, in chromium', () => {
  let browser: BrowserContext;
  let work: string;
  let html: string;

  beforeAll(async () => {
    work = await mkdtemp(join(tmpdir(), 'stopspan-print-'));
    const { result } = await auditFeed(FEED, { ridership: RIDERSHIP });
    await writeReport(result, join(work, 'demo'), { formats: ['html'] });
    html = pathToFileURL(join(work, 'demo', 'index.html')).href;
    browser = await launchChromium(join(work, 'profile'));
  });
  afterAll(async () => {
    await browser?.close();
    if (work) await rm(work, { recursive: true, force: true });
  });

  async function open(width: number, height: number): Promise<Page> {
    const page = await browser.newPage();
    await page.setViewportSize({ width, height });
    await page.goto(html);
    await page.waitForSelector('html[data-ready="1"]');
    return page;
  }

  it(`prints to a PDF of fewer than ${MAX_DEMO_PAGES} A4 pages, the first with the headline, top candidates and cautions`, async () => {
    const page = await open(1280, 900);
    // open one pattern so its map is drawn: an opened map prints
    await page.click('details.pattern > summary');
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    // each page of a PDF is one object of /Type /Page (ISO 32000-1 section 7.7.3.3 [C])
    const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
    expect(pages).toBeGreaterThan(1);
    expect(pages).toBeLessThan(MAX_DEMO_PAGES);
    await page.setViewportSize({ width: PRINT_WIDTH_PX, height: PRINT_HEIGHT_PX });
    await page.emulateMedia({ media: 'print' });
    const m = await page.evaluate(() => {
      const bottom = (sel: string) => document.querySelector(sel)!.getBoundingClientRect().bottom + window.scrollY;
      const shown = (sel: string) =>
        Array.from(document.querySelectorAll(sel)).filter((e) => getComputedStyle(e).display !== 'none').length;
      const tables = Array.from(document.querySelectorAll('table')).filter((t) => t.getClientRects().length > 0);
      return {
        cautionsBottom: bottom('#cautions'),
        topList: document.querySelectorAll('ol.top-cands li').length,
        gapsBreak: getComputedStyle(document.querySelector('#gaps')!).breakBefore,
        controlsShown: shown('.controls'),
        overflowing: tables.filter(
          (t) =>
            t.scrollWidth > document.documentElement.clientWidth + 1 ||
            t.getBoundingClientRect().right > document.documentElement.clientWidth + 1,
        ).length,
        tables: tables.length,
        mapsShown: Array.from(document.querySelectorAll('svg.chart.map')).filter((s) => s.getBoundingClientRect().width > 100).length,
        candRowsShown: shown('#cand-table tbody tr'),
      };
    });
    expect(m.cautionsBottom).toBeLessThanOrEqual(PRINT_HEIGHT_PX);
    expect(m.topList).toBeGreaterThan(0);
    expect(m.gapsBreak).toBe('page');
    expect(m.controlsShown).toBe(0);
    expect(m.tables).toBeGreaterThan(2);
    expect(m.overflowing).toBe(0);
    expect(m.mapsShown).toBe(1);
    expect(m.candRowsShown).toBeLessThanOrEqual(40);
    await page.close();
  });

  it('fits 375 px: no sideways page scroll, chart labels of 10 px or more, tables scroll in named regions a keyboard reaches', async () => {
    // the page is laid out in a frame 375 px wide: a browser window may refuse to be that narrow (a minimum
    // window width), a frame may not, so the width tested is the one asked for wherever the test runs
    const page = await browser.newPage();
    await page.setViewportSize({ width: 800, height: 900 });
    const frameHost = join(work, 'phone.html');
    await writeFile(
      frameHost,
      `<!doctype html><title>375 px</title><body style="margin:0"><iframe title="report" src="${html}" style="width:375px;height:800px;border:0"></iframe>`,
    );
    await page.goto(pathToFileURL(frameHost).href);
    const frame = await (await page.waitForSelector('iframe')).contentFrame();
    if (!frame) throw new Error('the frame did not load');
    await frame.waitForSelector('html[data-ready="1"]');
    await frame.click('details.pattern > summary'); // a pattern's map, strip and stop list too
    await frame.waitForSelector('details.pattern[open] svg.chart.strip'); // drawn by the toggle event, which comes after the click
    const m = await frame.evaluate(() => {
      let minLabelPx = Infinity;
      for (const t of Array.from(document.querySelectorAll('svg.chart text'))) {
        if (!t.getBoundingClientRect().width) continue;
        const ctm = (t as SVGTextElement).ownerSVGElement!.getScreenCTM();
        minLabelPx = Math.min(minLabelPx, parseFloat(getComputedStyle(t).fontSize) * (ctm ? ctm.a : 1));
      }
      const regions = Array.from(document.querySelectorAll('.table-wrap, .strip-wrap, .chart-scroll'));
      // what reaches past the right edge outside any box of its own that scrolls or clips, named for a failure
      const edge = document.documentElement.clientWidth;
      const past = Array.from(document.querySelectorAll('body *'))
        .filter((e) => {
          if (e.getBoundingClientRect().right <= edge + 0.5) return false;
          for (let a = e.parentElement; a; a = a.parentElement) if (getComputedStyle(a).overflowX !== 'visible') return false;
          return true;
        })
        .map(
          (e) =>
            `${e.tagName.toLowerCase()}${e.id ? '#' + e.id : ''}.${e.getAttribute('class') ?? ''} right ${Math.round(e.getBoundingClientRect().right)}`,
        );
      return {
        past: past.slice(-5),
        viewport: edge,
        pageWidth: document.documentElement.scrollWidth,
        minLabelPx,
        regions: regions.length,
        unnamed: regions.filter(
          (r) => r.getAttribute('tabindex') !== '0' || r.getAttribute('role') !== 'region' || !r.getAttribute('aria-label'),
        ).length,
        candWrapScrolls: (() => {
          const w = document.querySelector('#candidates .table-wrap')!;
          return w.scrollWidth > w.clientWidth;
        })(),
      };
    });
    expect(m.viewport).toBe(375);
    expect(m.pageWidth, `reaching past 375 px: ${m.past.join('; ')}`).toBeLessThanOrEqual(375);
    expect(m.minLabelPx).toBeGreaterThanOrEqual(10);
    expect(m.regions).toBeGreaterThan(3);
    expect(m.unnamed).toBe(0);
    expect(m.candWrapScrolls).toBe(true);
    // from the candidates' search box the keyboard reaches the table's box, and arrow keys scroll it sideways
    await frame.focus('#cand-search');
    let reached = false;
    for (let i = 0; i < 10 && !reached; i++) {
      await page.keyboard.press('Tab');
      reached = await frame.evaluate(() => document.activeElement === document.querySelector('#candidates .table-wrap'));
    }
    expect(reached).toBe(true);
    await page.keyboard.press('ArrowRight');
    await page.keyboard.press('ArrowRight');
    await expect
      .poll(() => frame.evaluate(() => document.querySelector('#candidates .table-wrap')!.scrollLeft), { timeout: 3000 })
      .toBeGreaterThan(0);
    await page.close();
  });

  it.skipIf(!AXE)(
    'has no serious or critical accessibility violation (axe-core) on a desktop and at 375 px, a pattern opened',
    async () => {
      for (const [width, height] of [
        [1280, 900],
        [375, 800],
      ]) {
        const page = await open(width, height);
        await page.click('details.pattern > summary');
        await page.addScriptTag({ content: AXE! });
        const found = (await page.evaluate(async () => {
          const axe = (
            window as unknown as {
              axe: { run: (ctx: Document, o: object) => Promise<{ violations: { id: string; impact: string; nodes: unknown[] }[] }> };
            }
          ).axe;
          const r = await axe.run(document, { resultTypes: ['violations'] });
          return r.violations.map((v) => ({ id: v.id, impact: v.impact, nodes: v.nodes.length }));
        })) as { id: string; impact: string; nodes: number }[];
        expect(
          found.filter((v) => v.impact === 'serious' || v.impact === 'critical'),
          `at ${width} px`,
        ).toEqual([]);
        await page.close();
      }
    },
  );

  it('shows a long candidate table 400 rows at a time with "show more", and a row links to its pattern, opened and drawn', async () => {
    const sample = makeSampleResult();
    const base = sample.candidates;
    const many = Array.from({ length: 950 }, (_, i) => ({ ...base[i % base.length], rank: i + 1, stopName: `stop ${i + 1}` }));
    await writeReport({ ...sample, candidates: many }, join(work, 'many'), { formats: ['html'] });
    const page = await browser.newPage();
    await page.goto(pathToFileURL(join(work, 'many', 'index.html')).href);
    await page.waitForSelector('html[data-ready="1"]');
    const rows = () => page.$$eval('#cand-table tbody tr', (r) => r.length);
    expect(await rows()).toBe(400);
    const more = page.locator('#candidates button.show-more');
    expect(await more.textContent()).toBe('Show 400 more (550 not shown)');
    await more.click();
    expect(await rows()).toBe(800);
    await more.click();
    expect(await rows()).toBe(950);
    expect(await more.isHidden()).toBe(true);
    const first = many[0].patternIds[0];
    await page.locator('#cand-table tbody tr').first().locator('a.pat-link').click();
    const opened = await page.evaluate((id) => {
      const d = document.getElementById('p-' + id) as HTMLDetailsElement;
      return {
        open: d.open,
        maps: d.querySelectorAll('svg.chart.map').length,
        focused: document.activeElement === d.querySelector('summary'),
      };
    }, first);
    expect(opened).toEqual({ open: true, maps: 1, focused: true });
    await page.close();
  });
});
