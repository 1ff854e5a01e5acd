// The what-if page and its helpers on a hand-built Vellmoor corridor: stop and route names carrying markup
// stay text (no element, attribute or script comes from them), the page is self-contained, it shows the
// figures, the sensitivity and every caution, and the strips place removed, moved and added stops where
// the scenario puts them. Also the terminal text and the atomic folder writer.
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { evaluateScenario } from '../../src/whatif/whatif.js';
import { CAUTIONS } from '../../src/audit/cautions.js';
import { CAUTIONS as REPORT_CAUTIONS } from '../../src/report/cautions.js';
import { whatifHtml } from '../../src/report/whatifHtml.js';
import { whatifStrips } from '../../src/report/whatifStrips.js';
import { whatifText } from '../../src/report/whatifText.js';
import { nearestOnStopLine } from '../../src/network/nearestOnStopLine.js';
import { REPORT_MARKER, writeFolder } from '../../src/report/writeFolder.js';
import { handmadeNetwork } from '../helpers/handmade.js';
import { scanHtml } from '../security/htmlScan.js';
import type { ModelParams } from '../../src/model/params.js';

const NASTY = '<img src=x onerror=alert(1)> "Quay" & </script><script>alert(2)</script>';
const even = Array.from({ length: 12 }, (_, j) => j * 250);
const { feed, patterns } = handmadeNetwork({ distM: even, tripsPerDay: 30, sharedAt: 10 });
feed.stops[feed.stopIndex.get('v1-4')!].name = `Vellmoor ${NASTY} 4`;
feed.stops[feed.stopIndex.get('v1-6')!].name = 'Tollgate\u001b[2J Row'; // a terminal escape in a name
feed.routes.get('V1')!.shortName = `1<b>x</b>`;
const params: Partial<ModelParams> = { cruise_speed_mps: 11.176, stopping_model: 'always' };
const s7 = feed.stops[feed.stopIndex.get('v1-7')!];
const s2 = feed.stops[feed.stopIndex.get('v1-2')!];
const s3 = feed.stops[feed.stopIndex.get('v1-3')!];
const scenario = {
  remove: ['v1-4', 'v1-6'],
  move: [{ stop: 'v1-7', lat: s7.lat, lon: s7.lon + 0.001 }], // about 68 m further along at 52.1 N
  add: [{ lat: (s2.lat + s3.lat) / 2, lon: (s2.lon + s3.lon) / 2, route: 'V1', name: `New ${NASTY}` }],
};
const result = evaluateScenario(feed, patterns, scenario, { params });
const strips = whatifStrips(feed, patterns, scenario, result);
const html = whatifHtml(result, strips, { feedSource: `vellmoor-${NASTY}.zip` });
const dirs: string[] = [];
afterAll(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

describe('whatifStrips', () => {
  it('lays out today and after: removed stops marked, the moved stop shifted, the added stop between its neighbours', () => {
    expect(strips.map((s) => s.patternId)).toEqual(['V1:0:1']);
    const s = strips[0];
    expect(s.before.length).toBe(12);
    expect(s.before.filter((x) => x.change === 'removed').map((x) => x.stopId)).toEqual(['v1-4', 'v1-6']);
    expect(s.after.length).toBe(12 - 2 + 1);
    const added = s.after.find((x) => x.change === 'added')!;
    expect(added.posM).toBeCloseTo(625, 0); // midway between the stops at 500 m and 750 m
    const moved = s.after.find((x) => x.change === 'moved')!;
    // 0.001 degree of longitude at 52.1 N: 111 320 * cos(52.1 deg) / 1000 = 68.4 m (equirectangular, [D])
    expect(moved.posM - 1750).toBeCloseTo((111_320 * Math.cos((52.1 * Math.PI) / 180)) / 1000, 0);
    for (let i = 1; i < s.after.length; i++) expect(s.after[i].posM).toBeGreaterThanOrEqual(s.after[i - 1].posM);
  });

  it('places the added and moved stops where the engine weighs them: one snapping for both (nearestOnStopLine)', () => {
    const pattern = patterns.patterns.find((p) => p.id === 'V1:0:1')!;
    const model = pattern.stopIdx.map((_, j) => j).filter((j) => pattern.passengerStop[j] !== false);
    const stops = model.map((j) => feed.stops[pattern.stopIdx[j]]);
    const at = (lat: number, lon: number) =>
      nearestOnStopLine(
        stops.map((x) => x.lat),
        stops.map((x) => x.lon),
        model.map((j) => pattern.distAlongM[j]),
        lat,
        lon,
      ).posM;
    const s = strips[0];
    expect(s.after.find((x) => x.change === 'added')!.posM).toBe(at(scenario.add[0].lat, scenario.add[0].lon));
    expect(s.after.find((x) => x.change === 'moved')!.posM).toBe(at(scenario.move[0].lat, scenario.move[0].lon));
  });
});

describe('whatifHtml', () => {
  const scan = scanHtml(html);

  it('keeps markup in stop, route and file names as text', () => {
    const names = new Set(scan.tags.map((t) => t.name));
    for (const bad of ['img', 'b', 'iframe', 'object', 'a', 'link']) expect(names.has(bad)).toBe(false);
    expect(scan.rawTexts.filter((r) => r.tag === 'script')).toEqual([]); // the page has no script at all
    for (const t of scan.tags) for (const a of t.attrs) expect(a.name.startsWith('on')).toBe(false);
    const text = scan.texts.join('');
    expect(text).toContain(`Vellmoor ${NASTY} 4 (v1-4): removed`);
    expect(text).toContain(`New ${NASTY}: added`);
    expect(text).toContain('Route 1<b>x</b> to Harbour');
    expect(html).toContain('&lt;img src=x onerror=alert(1)&gt;');
  });

  it('is self-contained: no network address, no external resource', () => {
    expect(html).not.toMatch(/https?:\/\//);
    for (const t of scan.tags) for (const a of t.attrs) expect(['src', 'href']).not.toContain(a.name);
  });

  it('shows the figures, the sensitivity and every caution', () => {
    const text = scan.texts.join(' ');
    for (const c of CAUTIONS) expect(text).toContain(c);
    expect(text).toContain('walk_weight=1.5');
    expect(text).toContain('walk_weight=2.5');
    expect(text).toMatch(/Run time saved per trip, s/);
    expect(text).toContain(`${Math.round(result.totals.walkAddedPaxMinPerDay).toLocaleString('en-US')}`);
    expect(scan.tags.filter((t) => t.name === 'svg' && !t.closing).length).toBe(1);
  });
});

describe('cautions', () => {
  it('have one source: the report module re-exports the audit module', () => {
    expect(REPORT_CAUTIONS).toBe(CAUTIONS);
    expect(result.cautions).toEqual([...CAUTIONS]);
    expect(CAUTIONS.join(' ')).toMatch(/ADA/);
    expect(CAUTIONS.join(' ')).toMatch(/Title VI/);
  });
});

describe('whatifText', () => {
  it('prints a table per pattern and in total, the sensitivity and the cautions, with control characters shown', () => {
    const t = whatifText(result, { feedSource: 'vellmoor.zip', labels: new Map([['V1:0:1', 'route 1 to \u001b[31mHarbour']]) });
    expect(t).not.toMatch(/\u001b/);
    expect(t).toContain('\\u001b[31mHarbour');
    expect(t).toMatch(/^ +V1:0:1 +total$/m);
    expect(t).toMatch(/^net, pax-min\/day/m);
    expect(t).toMatch(/sensitivity \(net pax-min\/day\): walk_weight=1\.5 -?[\d,]+, walk_weight=2\.5 -?[\d,]+/);
    expect(t).toContain('Title VI');
    expect(t).toContain('V1:0:1: route 1 to \\u001b[31mHarbour\n');
    expect(t).toMatch(/^  removes v1-4 [^\n]*: gaps \d+ \+ \d+ m become \d+ m, within the \d+ m policy$/m);
    expect(t).toMatch(/^  removes v1-6 /m);
    expect(t).toMatch(/^  moves v1-7 /m);
    expect(t).toMatch(/^  adds a stop: splits a \d+ m gap into \d+ \+ \d+ m, /m);
  });

  it('gives the distances in feet with units imperial, and the same passenger-minutes', () => {
    const metric = whatifText(result, { feedSource: 'vellmoor.zip' });
    const imperial = whatifText(result, { feedSource: 'vellmoor.zip', units: 'imperial' });
    const gapRow = (text: string, unit: string): number[] => {
      const line = text.split('\n').find((l) => l.startsWith(`widest gap a change makes, ${unit} (policy`));
      expect(line, `a gap row in ${unit}`).toBeDefined();
      return [...line!.matchAll(/([\d,]+)/g)].map((m) => Number(m[1].replace(/,/g, '')));
    };
    const m = gapRow(metric, 'm');
    const ft = gapRow(imperial, 'ft');
    expect(ft.length).toBe(m.length);
    // the international foot is exactly 0.3048 m (NIST SP 811, appendix B); each figure is rounded to 1
    ft.forEach((f, i) => expect(Math.abs(f * 0.3048 - m[i])).toBeLessThanOrEqual(1));
    expect(imperial).toMatch(/walking policy: .* \d[\d,]* ft/);
    const net = (text: string): string | undefined =>
      text
        .split('\n')
        .find((l) => l.startsWith('net, pax-min/day'))
        ?.replace(/ +/g, ' '); // columns widen with feet
    expect(net(imperial)).toBe(net(metric));
    expect(() => whatifText(result, { units: 'furlongs' as never })).toThrow(/units/);
  });
});

describe('writeFolder', () => {
  it('writes the folder whole, refuses an existing one without force and replaces it with force', async () => {
    const root = mkdtempSync(join(tmpdir(), 'stopspan-whatif-'));
    dirs.push(root);
    const out = join(root, 'scenario');
    await writeFolder(out, [
      ['index.html', html],
      ['scenario.json', '{}\n'],
    ]);
    expect(readdirSync(out).sort()).toEqual([REPORT_MARKER, 'index.html', 'scenario.json']);
    await expect(writeFolder(out, [['index.html', 'x']])).rejects.toMatchObject({ code: 'output-exists' });
    expect(readFileSync(join(out, 'index.html'), 'utf8')).toBe(html);
    await writeFolder(out, [['index.html', 'second']], { force: true });
    expect(readdirSync(out).sort()).toEqual([REPORT_MARKER, 'index.html']);
    expect(readdirSync(root)).toEqual(['scenario']); // no temporary folder left behind
    await expect(writeFolder(join(root, 'x'), [['../escape.html', 'x']])).rejects.toMatchObject({ code: 'bad-option' });
    expect(existsSync(join(root, 'escape.html'))).toBe(false);
  });

  it('leaves the old folder in place when the new one cannot be written', async () => {
    const root = mkdtempSync(join(tmpdir(), 'stopspan-whatif-'));
    dirs.push(root);
    const out = join(root, 'keep');
    mkdirSync(out);
    writeFileSync(join(out, 'index.html'), 'old');
    // a file name with a folder in it is refused before anything is written or renamed
    await expect(
      writeFolder(
        out,
        [
          ['index.html', 'new'],
          ['sub/x.html', 'x'],
        ],
        { force: true },
      ),
    ).rejects.toMatchObject({ code: 'bad-option' });
    expect(readFileSync(join(out, 'index.html'), 'utf8')).toBe('old');
  });
});
