// The other HTML pages the CLI writes (compare.html, history.html, the what-if index.html) under the same
// hostile feed text as injection.test.ts: no feed string with markup characters appears raw, no element
// or attribute exists that the same page for the plain minimal feed lacks, no event-handler or URL
// attribute, and any embedded JSON block holds no "<" and parses. Built CLI, pages parsed with the
// WHATWG-rule tokenizer in htmlScan.ts.

import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync, cpSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { ROOT, tableText } from '../fuzz/demoTables.js';
import { AGENCY_NAME, H, HOSTILE, MINIMAL, STOP_IDS, STOP_NAMES, writeHostileFeed } from './hostileFeed.js';
import { scanHtml, type HtmlScan } from './htmlScan.js';
import { CLI } from '../helpers/cli.js';

const work = mkdtempSync(join(tmpdir(), 'stopspan-pages-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const q = (s: string) => `"${s.replace(/"/g, '""')}"`;
const HOSTILE_VERSION = `${H.script}${H.attr}`;
const HOSTILE_PUBLISHER = `${H.img}${H.quoteApos}`;

function run(args: string[]) {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 90_000, cwd: work });
  expect(r.status, `${args.join(' ')}: ${r.stderr}`).toBe(0);
  return r;
}

/** Two versions of a feed: the second renames one stop and drops the last stop of a pattern. */
function feedPair(kind: 'hostile' | 'plain'): [string, string] {
  const a = join(work, `${kind}-a`);
  const b = join(work, `${kind}-b`);
  if (kind === 'hostile') {
    writeHostileFeed(a);
    writeFileSync(
      join(a, 'feed_info.txt'),
      `feed_publisher_name,feed_publisher_url,feed_lang,feed_version\n${q(HOSTILE_PUBLISHER)},https://x.example/,en,${q(HOSTILE_VERSION)}\n`,
    );
  } else {
    cpSync(MINIMAL, a, { recursive: true });
    writeFileSync(
      join(a, 'feed_info.txt'),
      'feed_publisher_name,feed_publisher_url,feed_lang,feed_version\nVellmoor,https://x.example/,en,2026.11\n',
    );
  }
  cpSync(a, b, { recursive: true });
  const stopName = kind === 'hostile' ? STOP_NAMES.S2 : 'Mill Ln / Stop 2';
  const renamed = kind === 'hostile' ? `${H.attr}${H.img} (renamed)` : 'Mill Ln / Stop 2 (renamed)';
  const grid = parse(readFileSync(join(b, 'stops.txt')), { bom: true }) as string[][];
  const nameCol = grid[0].indexOf('stop_name');
  const row = grid.find((r) => r[nameCol] === stopName)!;
  row[nameCol] = renamed;
  writeFileSync(join(b, 'stops.txt'), tableText({ header: grid[0], rows: grid.slice(1) }));
  // the last stop of the second route, T4, leaves both of its trips
  const t4 = kind === 'hostile' ? STOP_IDS.T4 : 'T4';
  const st = readFileSync(join(b, 'stop_times.txt'), 'utf8')
    .split('\n')
    .filter((l) => !l.includes(`,${t4},`));
  writeFileSync(join(b, 'stop_times.txt'), st.join('\n'));
  return [a, b];
}

function pages(kind: 'hostile' | 'plain'): Record<string, string> {
  const [a, b] = feedPair(kind);
  run(['compare', a, b, '--out', `${kind}-compare`, '-q']);
  const db = join(work, `${kind}-history.sqlite`);
  run(['audit', a, '--out', `${kind}-audit-a`, '--history', db, '-q']);
  run(['audit', b, '--out', `${kind}-audit-b`, '--history', db, '-q']);
  run(['history', db, '--out', `${kind}-history`, '-q']);
  const removeId = kind === 'hostile' ? STOP_IDS.S3 : 'S3'; // =HYPERLINK("http://x") in the hostile feed
  run(['whatif', a, '--remove', removeId, '--out', `${kind}-whatif`, '-q']);
  return {
    'compare.html': readFileSync(join(work, `${kind}-compare`, 'compare.html'), 'utf8'),
    'history.html': readFileSync(join(work, `${kind}-history`, 'history.html'), 'utf8'),
    'whatif index.html': readFileSync(join(work, `${kind}-whatif`, 'index.html'), 'utf8'),
  };
}

const names = (s: HtmlScan) => new Set(s.tags.map((t) => t.name));
const attrNames = (s: HtmlScan) => new Set(s.tags.flatMap((t) => t.attrs.map((a) => a.name)));

describe.skipIf(!existsSync(CLI))('compare, history and what-if pages with hostile feed text (built CLI)', () => {
  let hostile: Record<string, string>;
  let plain: Record<string, string>;

  it('writes all three pages for both feeds', () => {
    hostile = pages('hostile');
    plain = pages('plain');
    for (const p of Object.values(hostile)) expect(p.length).toBeGreaterThan(500);
  });

  it.each(['compare.html', 'history.html', 'whatif index.html'])(
    '%s: no raw feed markup, nothing the plain page lacks, no handlers',
    (page) => {
      const html = hostile[page];
      for (const s of [...HOSTILE, AGENCY_NAME, HOSTILE_VERSION, HOSTILE_PUBLISHER]) {
        if (/[<>"]/.test(s)) expect(html.includes(s), `raw ${JSON.stringify(s)} in ${page}`).toBe(false);
      }
      const scan = scanHtml(html);
      const base = scanHtml(plain[page]);
      for (const n of names(scan)) expect(names(base), `${page}: element <${n}>`).toContain(n);
      for (const a of attrNames(scan)) expect(attrNames(base), `${page}: attribute ${a}`).toContain(a);
      const attrs = scan.tags.flatMap((t) => t.attrs);
      expect(attrs.filter((a) => /^on/.test(a.name))).toEqual([]);
      expect(
        attrs.filter(
          (a) => ['href', 'src', 'action', 'formaction', 'srcdoc', 'xlink:href'].includes(a.name) && /^\s*javascript:/i.test(a.value),
        ),
      ).toEqual([]);
      expect(scan.tags.filter((t) => t.name === 'script' && !t.closing).length).toBe(
        base.tags.filter((t) => t.name === 'script' && !t.closing).length,
      );
      expect(scan.bareLessThan).toBe(0);
      for (const r of scan.rawTexts.filter((x) => x.tag === 'script' && x.attrs.some((a) => a.name === 'type' && /json/.test(a.value)))) {
        expect(r.body).not.toContain('<');
        JSON.parse(r.body);
      }
    },
  );

  it('the hostile text is there, escaped: compare shows the renamed stop, history the feed version', () => {
    const text = (page: string) => {
      const s = scanHtml(hostile[page]);
      return [
        ...s.texts,
        ...s.tags.flatMap((t) => t.attrs.map((a) => a.value)),
        ...s.rawTexts.filter((r) => r.tag === 'script').map((r) => r.body),
      ].join('\n');
    };
    const compare = text('compare.html');
    expect(compare).toContain(`${H.attr}${H.img} (renamed)`);
    expect(text('history.html')).toContain(HOSTILE_VERSION);
  });
});
