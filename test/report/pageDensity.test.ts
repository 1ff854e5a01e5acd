// The land-use layer's density under each pattern's map (index.html), in a real browser (Debian's chromium
// through playwright-core): the demo city audited with its invented land-use layer draws light squares of
// people under the route, no more than the page's per-map bound, with a legend entry saying what they are;
// the same audit without the layer draws none; the empty stretches are still marked on the strip; and the
// page grows by no more than the documented cap on the squares it carries.

import { readFileSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { BrowserContext, Page } from 'playwright-core';
import { CHROMIUM, haveChromium, launchChromium } from '../helpers/browser.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditFeed } from '../../src/audit/auditFeed.js';
import type { AuditResult } from '../../src/audit/types.js';
import { DENSITY_CELL_M, DENSITY_NEAR_M, MAX_DENSITY_CELLS } from '../../src/model/catchments.js';
import { MAP_DENSITY_CELLS } from '../../src/report/html/indexHtml.js';
import { writeReport } from '../../src/report/writeReport.js';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
const LAYER = join(ROOT, 'fixtures/demo/land-use.geojson');
if (!haveChromium) console.warn(`page density tests skipped: ${CHROMIUM} is absent`);

let work: string;
let withLayer: AuditResult;

beforeAll(async () => {
  work = await mkdtemp(join(tmpdir(), 'stopspan-density-'));
  withLayer = (await auditFeed(DEMO, { landUse: LAYER })).result;
  const bare = (await auditFeed(DEMO)).result;
  // the same audit with its density squares taken out: the page's growth is theirs alone
  const noSquares: AuditResult = { ...withLayer, landUse: { ...withLayer.landUse!, density: undefined } };
  await writeReport(withLayer, join(work, 'layer'), { formats: ['html'] });
  await writeReport(noSquares, join(work, 'no-squares'), { formats: ['html'] });
  await writeReport(bare, join(work, 'bare'), { formats: ['html'] });
}, 60_000);
afterAll(async () => {
  if (work) await rm(work, { recursive: true, force: true });
});

describe('the density squares in the page data', () => {
  it('holds the people near the stops served, at most MAX_DENSITY_CELLS squares, and the page grows by a bounded amount', () => {
    const g = withLayer.landUse!.density!;
    const n = g.cells.length / 3;
    expect(n).toBeGreaterThan(100);
    expect(n).toBeLessThanOrEqual(MAX_DENSITY_CELLS);
    expect(g.cellM).toBe(DENSITY_CELL_M);
    // every square has people in it, and together they hold every covered person (a covered person is
    // within a walk of a stop, so within DENSITY_NEAR_M, twice a walk, of it: kept)
    let sum = 0;
    for (let k = 2; k < g.cells.length; k += 3) {
      expect(g.cells[k]).toBeGreaterThan(0);
      sum += g.cells[k];
    }
    expect(sum).toBeGreaterThanOrEqual(withLayer.landUse!.peopleCovered - n); // each square rounded by up to half a person
    expect(sum).toBeLessThanOrEqual(withLayer.landUse!.people + n);
    const size = (folder: string) => readFileSync(join(work, folder, 'index.html')).length;
    const growth = size('layer') - size('no-squares');
    expect(growth).toBeGreaterThan(0);
    // [D] a square is three numbers of at most 6 characters with their commas in the JSON: under 22 bytes,
    // so the page carries at most 22 x MAX_DENSITY_CELLS bytes of squares and a few hundred of their key
    expect(growth).toBeLessThanOrEqual(22 * n + 400);
    expect(growth).toBeLessThanOrEqual(22 * MAX_DENSITY_CELLS + 400);
  });
});

describe.skipIf(!haveChromium)('the density squares under the maps in chromium', () => {
  let browser: BrowserContext;
  beforeAll(async () => {
    browser = await launchChromium(join(work, 'profile'));
  }, 60_000);
  afterAll(async () => {
    await browser?.close();
  });

  async function openPattern(folder: string, patternId: string): Promise<{ page: Page; errors: string[] }> {
    const page = await browser.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(pathToFileURL(join(work, folder, 'index.html')).href + `#p-${encodeURIComponent(patternId)}`);
    await page.waitForSelector('html[data-ready="1"]');
    await page.waitForSelector(`[id="p-${patternId}"] svg.map`);
    return { page, errors };
  }

  it('draws light squares under the route with a layer, none without, and keeps the empty stretches marked', async () => {
    // a pattern with an empty stretch listed for review, so both marks are seen on one section
    const review = withLayer.reviewGaps[0];
    expect(review, 'the demo with its layer has a wide gap listed for review').toBeDefined();
    const id = review.patternIds[0];
    const { page, errors } = await openPattern('layer', id);
    const sec = page.locator(`[id="p-${id}"]`);
    const squares = await sec.locator('svg.map g.density-cells rect.density').count();
    expect(squares).toBeGreaterThan(0);
    expect(squares).toBeLessThanOrEqual(MAP_DENSITY_CELLS);
    // under the route: the squares' group comes before the route line in the map
    const order = await sec.locator('svg.map').evaluate((s) => Array.from(s.children, (c) => c.getAttribute('class')));
    expect(order.indexOf('density-cells')).toBeLessThan(order.indexOf('route-line'));
    // light: no square darker than the scale's top
    const opacities = await sec.locator('svg.map rect.density').evaluateAll((rs) => rs.map((r) => Number(r.getAttribute('fill-opacity'))));
    expect(Math.max(...opacities)).toBeLessThanOrEqual(0.48);
    expect(Math.min(...opacities)).toBeGreaterThanOrEqual(0.06);
    // the legend says what they are
    const legend = await sec.locator('.legend').textContent();
    expect(legend).toContain(`where people are (land-use layer): squares within ${DENSITY_NEAR_M} m of the pattern’s stops`);
    // the empty stretch is still drawn apart on the strip
    expect(await sec.locator('svg.strip line.gap-empty').count()).toBeGreaterThan(0);
    expect(errors).toEqual([]);
    await page.close();

    const bare = await openPattern('bare', id);
    const bareSec = bare.page.locator(`[id="p-${id}"]`);
    expect(await bareSec.locator('svg.map rect.density').count()).toBe(0);
    expect(await bareSec.locator('.legend').textContent()).not.toContain('land-use layer');
    expect(bare.errors).toEqual([]);
    await bare.page.close();
  });

  it('merges squares into wider ones on a long pattern so a map draws at most its bound', async () => {
    // the pattern whose map would hold the most squares, counted as the page counts them
    const g = withLayer.landUse!.density!;
    const cos = Math.cos((g.lat0 * Math.PI) / 180);
    const countNear = (stops: { lat: number; lon: number }[]) => {
      let n = 0;
      for (let k = 0; k < g.cells.length; k += 3) {
        const lat = g.lat0 + (g.cells[k] + 0.5) * g.latStep;
        const lon = g.lon0 + (g.cells[k + 1] + 0.5) * g.lonStep;
        if (stops.some((s) => Math.hypot((lat - s.lat) * 111195, (lon - s.lon) * 111195 * cos) <= DENSITY_NEAR_M)) n++;
      }
      return n;
    };
    const counts = withLayer.patterns.map((p) => ({
      id: p.patternId,
      n: countNear(withLayer.stops.filter((s) => s.patternId === p.patternId).map((s) => ({ lat: s.stopLat, lon: s.stopLon }))),
    }));
    const most = counts.sort((a, b) => b.n - a.n)[0];
    expect(most.n).toBeGreaterThan(MAP_DENSITY_CELLS); // else this test shows nothing
    const { page, errors } = await openPattern('layer', most.id);
    const drawn = await page.locator(`[id="p-${most.id}"] svg.map rect.density`).count();
    expect(drawn).toBeGreaterThan(MAP_DENSITY_CELLS / 4);
    expect(drawn).toBeLessThanOrEqual(MAP_DENSITY_CELLS);
    expect(errors).toEqual([]);
    await page.close();
  });
});
