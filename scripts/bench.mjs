#!/usr/bin/env node
// The benchmark (`npm run bench`): wall time, CPU time and peak memory of a full `stopspan audit` on the
// real feeds and on a scaling series of the demo city, against two floors measured in the same run:
// (a) inflating stop_times.txt and counting its lines, (b) the project's CSV reader alone over it. Each
// measurement runs in its own process (scripts/bench-run.mjs), several times; medians are reported, with
// the targets as PASS/FAIL. Not a test: nothing here is asserted, figures are printed and saved.
//
//   node scripts/bench.mjs [--runs 3] [--feeds DIR] [--only real|scaled|NAME,...] [--no-build] [--no-stages]
//     besides the audit, the library stages (readFeed, buildPatterns, runAudit, writeReport) are timed one by
//     one in a run of their own (--no-stages skips it); when the CLI's audit fails, the targets are judged
//     on that run instead, and say so
//   node scripts/bench.mjs --profile FEED [--top 20]     CPU profile of one audit, hottest functions first
//   node scripts/bench.mjs --report FILE.json            print the tables again from saved figures
//
// Figures are also written to bench-out/bench-results.json and bench-out/bench-results.md.

import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { spawn, spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const repoDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const benchOut = path.join(repoDir, 'bench-out');
const runner = path.join(repoDir, 'scripts/bench-run.mjs');
// The benchmark builds its own copy of the code (bench-out/dist), so that a build of dist/ running at the
// same time cannot change the code under measurement; with --no-build it measures dist/ as it stands.
const benchDist = path.join(benchOut, 'dist');
let distDir = benchDist;
const mainJs = () => path.join(distDir, 'bin/stopspan.js'); // the command as `stopspan` runs it (the bundle)

/** The targets of the benchmark (issue 8). */
const TARGETS = {
  bigFeed: 'nyct-bus-manhattan', // the feed the time and memory targets apply to
  maxRatioToInflate: 3, // full audit wall time within 3x floor (a)
  maxPeakMB: 400, // peak memory (max RSS) of the full audit
  maxPerRowRatio16x: 1.2, // time per stop_times row at 16x over that at 1x
  // Memory held must not grow with stop_times rows. Keeping them at all, even in the contract's compact
  // per-trip typed arrays (4+4+4+4+8+1+1 = 26 bytes a row), costs more than this per added row. The
  // series copies trips as well, and what a trip itself needs (its id, its place in a pattern) is held:
  // a few hundred bytes a trip, at about 29 rows a trip in the demo, stays well under it.
  maxBytesPerAddedRow: 16,
};

/** The files `stopspan audit` must write (the output contract). */
const OUTPUTS = ['patterns.csv', 'stops.csv', 'candidates.csv', 'stops.geojson', 'patterns.geojson', 'summary.json', 'index.html'];

function parseArgs(argv) {
  const opts = { runs: 3, feeds: null, only: null, build: true, profile: null, top: 20, stages: true, report: null };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const v = argv[i + 1];
    if (a === '--runs') ((opts.runs = Number(v)), i++);
    else if (a === '--feeds') ((opts.feeds = v), i++);
    else if (a === '--only') ((opts.only = v.split(',')), i++);
    else if (a === '--no-build') opts.build = false;
    else if (a === '--no-stages') opts.stages = false;
    else if (a === '--profile') ((opts.profile = v), i++);
    else if (a === '--top') ((opts.top = Number(v)), i++);
    else if (a === '--report') ((opts.report = v), i++);
    else throw new Error(`invalid option ${a}: expected --runs, --feeds, --only, --no-build, --no-stages, --profile, --report or --top`);
  }
  if (!Number.isInteger(opts.runs) || opts.runs < 1)
    throw new Error(`invalid option --runs: expected a whole number >= 1, got ${opts.runs}`);
  return opts;
}

function log(s = '') {
  process.stdout.write(s + '\n');
}

function note(s) {
  process.stderr.write(s + '\n');
}

/** The folder of the real feeds: $STOPSPAN_FEEDS, else ../shared/feeds beside the repository. */
function feedsDir(opt) {
  return path.resolve(opt ?? process.env.STOPSPAN_FEEDS ?? path.join(repoDir, '../shared/feeds'));
}

function build() {
  const tsc = path.join(repoDir, 'node_modules/typescript/bin/tsc');
  fs.rmSync(benchDist, { recursive: true, force: true });
  const r = spawnSync(process.execPath, [tsc, '-p', 'tsconfig.json', '--outDir', benchDist], { cwd: repoDir, encoding: 'utf8' });
  if (r.status !== 0)
    note(`bench: tsc reported errors (the build may be partial):\n${(r.stdout + r.stderr).split('\n').slice(0, 10).join('\n')}`);
  // then the command's bundle, as npm run build makes it (scripts/bundle-cli.mjs)
  const b = spawnSync(process.execPath, [path.join(repoDir, 'scripts/bundle-cli.mjs'), benchDist], { cwd: repoDir, encoding: 'utf8' });
  if (b.status !== 0) note(`bench: bundling the command failed:\n${(b.stdout + b.stderr).split('\n').slice(0, 10).join('\n')}`);
}

/** Runs one measurement in a child process; resolves to its figures plus the wall time seen from here. */
function measure(mode, feed, outDir) {
  const resultFile = path.join(os.tmpdir(), `stopspan-bench-${process.pid}-${Date.now()}-${Math.random().toString(36).slice(2)}.json`);
  // the stages run may collect garbage at its end, to weigh what the audit holds (heldMB)
  const args = [...(mode === 'stages' ? ['--expose-gc'] : []), runner, mode, feed, ...(outDir ? [outDir] : [])];
  return new Promise((resolve) => {
    const t0 = process.hrtime.bigint();
    const child = spawn(process.execPath, args, {
      cwd: repoDir,
      env: { ...process.env, BENCH_RESULT: resultFile, BENCH_DIST: distDir },
      stdio: ['ignore', 'ignore', 'pipe'],
    });
    let stderr = '';
    child.stderr.on('data', (c) => {
      stderr = (stderr + c).slice(-4000);
    });
    child.on('close', (status) => {
      const wallMs = Number(process.hrtime.bigint() - t0) / 1e6;
      let r = { mode, error: `no figures (exit ${status})` };
      try {
        r = JSON.parse(fs.readFileSync(resultFile, 'utf8'));
        fs.rmSync(resultFile, { force: true });
      } catch {
        /* the child died before writing its figures */
      }
      if (!r.error && r.exitCode !== 0) r.error = `exit ${r.exitCode}: ${stderr.trim().split('\n').slice(-3).join(' | ')}`;
      resolve({ ...r, wallMs, innerWallMs: r.wallMs, stderr });
    });
  });
}

function median(xs) {
  const s = xs.filter((x) => typeof x === 'number' && Number.isFinite(x)).sort((a, b) => a - b);
  if (!s.length) return NaN;
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Median figures of one measure over its runs; an error in any run makes the whole measure an error. */
function summarise(runs) {
  const failed = runs.find((r) => r.error);
  if (failed) return { error: failed.error, runs: runs.length };
  return {
    runs: runs.length,
    rows: runs[0].rows,
    wallMs: median(runs.map((r) => r.wallMs)),
    cpuMs: median(runs.map((r) => r.cpuMs)),
    maxRssMB: median(runs.map((r) => r.maxRssMB)),
    heldMB: median(runs.map((r) => r.heldMB)),
    wallMsAll: runs.map((r) => Math.round(r.wallMs)),
  };
}

/** Inputs: the real feeds, then the scaling series (generated fresh, deterministic). */
function collectInputs(opts) {
  const inputs = [];
  const want = (kind, name) => !opts.only || opts.only.includes(kind) || opts.only.includes(name);
  const dir = feedsDir(opts.feeds);
  if (fs.existsSync(dir)) {
    const order = ['lirr-rail', 'nyct-subway', 'nyct-bus-manhattan'];
    const zips = fs
      .readdirSync(dir)
      .filter((f) => f.endsWith('.zip'))
      .map((f) => f.replace(/\.zip$/, ''))
      .sort((a, b) => (order.indexOf(a) + 1 || 99) - (order.indexOf(b) + 1 || 99) || a.localeCompare(b));
    for (const name of zips) if (want('real', name)) inputs.push({ name, kind: 'real', file: path.join(dir, `${name}.zip`) });
  } else note(`bench: no real feeds at ${dir} (set STOPSPAN_FEEDS); measuring the scaling series only`);

  const demo = path.join(repoDir, 'fixtures/demo/demo-feed.zip');
  if (!fs.existsSync(demo)) note(`bench: no demo feed at ${demo} (npm run demo:generate); no scaling series`);
  else if (['demo-x1', 'demo-x4', 'demo-x16'].some((n) => want('scaled', n))) {
    const r = spawnSync(
      process.execPath,
      [path.join(repoDir, 'scripts/make-scaled.mjs'), '--in', demo, '--out', path.join(benchOut, 'scaled'), '--scales', '1,4,16'],
      { cwd: repoDir, encoding: 'utf8' },
    );
    if (r.status !== 0) note(`bench: make-scaled failed: ${r.stderr.trim()}`);
    else {
      for (const l of r.stdout.trim().split('\n')) {
        const { scale, file } = JSON.parse(l);
        const name = `demo-x${scale}`;
        if (want('scaled', name)) inputs.push({ name, kind: 'scaled', scale, file });
      }
    }
  }
  return inputs;
}

/** Measures floors (a), (b) and the audit on one input, interleaving the runs so drift hits all alike. */
async function benchInput(input, runs, withStages) {
  const raw = { inflate: [], inflateReader: [], csv: [], audit: [], stages: [] };
  let outputsMissing = [];
  for (let i = 0; i < runs; i++) {
    raw.inflate.push(await measure('inflate', input.file));
    raw.inflateReader.push(await measure('inflate-reader', input.file));
    raw.csv.push(await measure('csv', input.file));
    const outDir = fs.mkdtempSync(path.join(os.tmpdir(), `stopspan-bench-${input.name}-`));
    const a = await measure('audit', input.file, outDir);
    if (!a.error) {
      outputsMissing = OUTPUTS.filter((f) => !fs.existsSync(path.join(outDir, f)));
      if (outputsMissing.length) a.error = `outputs missing: ${outputsMissing.join(', ')}`;
    }
    raw.audit.push(a);
    fs.rmSync(outDir, { recursive: true, force: true });
    if (withStages) {
      const stDir = fs.mkdtempSync(path.join(os.tmpdir(), `stopspan-bench-${input.name}-`));
      raw.stages.push(await measure('stages', input.file, stDir));
      fs.rmSync(stDir, { recursive: true, force: true });
    }
    note(
      `bench: ${input.name} run ${i + 1}/${runs}: inflate ${fmtS(raw.inflate[i].wallMs)} s, reader-like ${raw.inflateReader[i].error ? 'n/a' : fmtS(raw.inflateReader[i].wallMs) + ' s'}, csv ${raw.csv[i].error ? 'n/a' : fmtS(raw.csv[i].wallMs) + ' s'}, audit ${a.error ? 'n/a' : fmtS(a.wallMs) + ' s'}`,
    );
  }
  const inflate = summarise(raw.inflate);
  const inflateReader = summarise(raw.inflateReader);
  const csv = summarise(raw.csv);
  const audit = summarise(raw.audit);
  const rows = inflate.rows ?? null;
  let stages = null;
  if (withStages) {
    stages = summarise(raw.stages);
    if (!stages.error) {
      stages.stageMs = {};
      stages.stageCpuMs = {};
      for (const k of Object.keys(raw.stages[0].stageMs ?? {})) {
        stages.stageMs[k] = median(raw.stages.map((r) => r.stageMs[k]));
        stages.stageCpuMs[k] = median(raw.stages.map((r) => r.stageCpuMs?.[k]));
      }
    }
  }
  return { ...input, rows, inflate, inflateReader, csv, audit, stages };
}

const fmtS = (ms) => (Number.isFinite(ms) ? (ms / 1000).toFixed(2) : 'n/a');
const fmtMB = (mb) => (Number.isFinite(mb) ? mb.toFixed(0) : 'n/a');
const fmtInt = (n) => (Number.isFinite(n) ? n.toLocaleString('en-US').replace(/,/g, ' ') : 'n/a');
const fmtX = (x) => (Number.isFinite(x) ? x.toFixed(2) + 'x' : 'n/a');
const usPerRow = (m, rows) => (m && !m.error && rows ? (m.wallMs * 1000) / rows : NaN);

function pad(cells, widths, right) {
  return cells
    .map((c, i) => (right[i] ? String(c).padStart(widths[i]) : String(c).padEnd(widths[i])))
    .join('  ')
    .trimEnd();
}

function printTable(header, rows, right) {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => String(r[i]).length)));
  log(pad(header, widths, right));
  log(
    widths
      .map((w) => '-'.repeat(w))
      .join('  ')
      .trimEnd(),
  );
  for (const r of rows) log(pad(r, widths, right));
}

function report(results, opts) {
  const machine =
    opts.machine ??
    `${os.cpus().length} cores, ${(os.totalmem() / 2 ** 30).toFixed(0)} GiB, node ${process.version}, ${os.platform()} ${os.arch()}`;
  const date = opts.date ?? new Date().toISOString().slice(0, 10);
  log('');
  log(`stopspan benchmark, ${date}, ${machine}; median of ${opts.runs} run(s) (the scaling series at least 5), each in its own process`);
  log(
    `load average at the start ${opts.loadAtStart.map((x) => x.toFixed(2)).join(' ')}, at the end ${os
      .loadavg()
      .map((x) => x.toFixed(2))
      .join(' ')} (other work on the machine inflates wall times)`,
  );
  log(
    "floor (a): inflate stop_times.txt and count its lines; floor (b): the project CSV reader over stop_times.txt; reader-like: floor (a) inflating the audit reader's way (reference only)",
  );
  log('');
  const rows = [];
  for (const r of results) {
    for (const [label, m] of [
      ['floor (a) inflate', r.inflate],
      ['reader-like inflate', r.inflateReader],
      ['floor (b) csv', r.csv],
      ['audit', r.audit],
    ]) {
      if (!m) continue; // figures saved before the reader-like measure existed
      if (m.error) rows.push([r.name, fmtInt(r.rows), label, 'n/a', 'n/a', 'n/a', 'n/a', '', m.error.slice(0, 70)]);
      else
        rows.push([
          r.name,
          fmtInt(r.rows),
          label,
          fmtS(m.wallMs),
          fmtS(m.cpuMs),
          fmtMB(m.maxRssMB),
          usPerRow(m, r.rows).toFixed(2),
          label === 'floor (a) inflate' ? '' : fmtX(m.wallMs / r.inflate.wallMs),
          '',
        ]);
    }
  }
  for (const r of results) {
    if (!r.stages) continue;
    const m = r.stages;
    if (m.error) rows.push([r.name, fmtInt(r.rows), 'stages', 'n/a', 'n/a', 'n/a', 'n/a', '', m.error.slice(0, 70)]);
    else {
      const st = Object.entries(m.stageMs)
        .map(([k, ms]) => `${k} ${fmtS(ms)} (CPU ${fmtS(m.stageCpuMs[k])})`)
        .join(', ');
      rows.push([
        r.name,
        fmtInt(r.rows),
        'stages',
        fmtS(m.wallMs),
        fmtS(m.cpuMs),
        fmtMB(m.maxRssMB),
        usPerRow(m, r.rows).toFixed(2),
        fmtX(m.wallMs / r.inflate.wallMs),
        st,
      ]);
    }
  }
  printTable(['input', 'stop_times rows', 'measure', 'wall s', 'CPU s', 'peak MB', 'µs/row', 'x floor a', 'note'], rows, [
    false,
    true,
    false,
    true,
    true,
    true,
    true,
    true,
    false,
  ]);

  // Targets.
  log('');
  log('targets');
  const verdicts = [];
  const pf = (ok) => (ok === null ? 'n/a ' : ok ? 'PASS' : 'FAIL');
  // the CLI audit when it ran; else the library stages run, labelled as such
  const fallback = results.some((r) => r.audit.error && r.stages && !r.stages.error);
  if (fallback) {
    // one measure throughout the scaling series: if one of its inputs falls back, all of them do
    const scaledFalls = results.some((r) => r.kind === 'scaled' && r.audit.error);
    for (const r of results) {
      const falls = r.audit.error || (scaledFalls && r.kind === 'scaled');
      if (falls && r.stages && !r.stages.error) r.audit = { ...r.stages, standIn: true, cliError: r.audit.error ?? null };
    }
    log('note: `stopspan audit` did not run on some inputs; their targets are judged on the library stages run (marked *)');
  }
  const star = (r) => (r.audit.standIn ? '*' : '');
  const big = results.find((r) => r.name === TARGETS.bigFeed);
  if (big) {
    const ratio = big.audit.error ? NaN : big.audit.wallMs / big.inflate.wallMs;
    const okRatio = Number.isFinite(ratio) ? ratio <= TARGETS.maxRatioToInflate : null;
    const okMem = big.audit.error ? null : big.audit.maxRssMB < TARGETS.maxPeakMB;
    verdicts.push({ target: 'audit-within-3x-inflate', ok: okRatio, value: ratio });
    verdicts.push({ target: 'audit-peak-under-400MB', ok: okMem, value: big.audit.maxRssMB });
    log(
      `${pf(okRatio)}  ${big.name}${star(big)}: audit wall ${fmtS(big.audit.wallMs)} s = ${fmtX(ratio)} floor (a) ${fmtS(big.inflate.wallMs)} s (target <= ${TARGETS.maxRatioToInflate}x)`,
    );
    if (!big.audit.error)
      log(
        `      by CPU time, less sensitive to other load: audit ${fmtS(big.audit.cpuMs)} s = ${fmtX(big.audit.cpuMs / big.inflate.cpuMs)} floor (a) ${fmtS(big.inflate.cpuMs)} s`,
      );
    // floor (a) uses yauzl's stream and zlib's 16 KiB buffers; the audit's reader inflates faster than that
    if (!big.audit.error && big.inflateReader && !big.inflateReader.error)
      log(
        `      for reference, against inflating the reader's way (1 MiB reads and buffers, ${fmtS(big.inflateReader.wallMs)} s): ${fmtX(ratio * (big.inflate.wallMs / big.inflateReader.wallMs))}`,
      );
    log(`${pf(okMem)}  ${big.name}${star(big)}: audit peak memory ${fmtMB(big.audit.maxRssMB)} MB (target < ${TARGETS.maxPeakMB} MB)`);
  } else log(`n/a   ${TARGETS.bigFeed}: not measured`);

  const s1 = results.find((r) => r.name === 'demo-x1');
  const s4 = results.find((r) => r.name === 'demo-x4');
  const s16 = results.find((r) => r.name === 'demo-x16');
  if (s1 && s16) {
    const per1 = usPerRow(s1.audit, s1.rows);
    const per16 = usPerRow(s16.audit, s16.rows);
    const ratio = per16 / per1;
    // Start-up costs dominate at 1x, so time per row falls with size even when the work grows faster than
    // the rows; the marginal CPU time per added row, 4x->16x against 1x->4x, is what shows such growth.
    let marginal = NaN;
    let m14 = NaN;
    let m416 = NaN;
    if (s4 && !s4.audit.error && !s16.audit.error && !s1.audit.error) {
      m14 = ((s4.audit.cpuMs - s1.audit.cpuMs) * 1000) / (s4.rows - s1.rows);
      m416 = ((s16.audit.cpuMs - s4.audit.cpuMs) * 1000) / (s16.rows - s4.rows);
      marginal = m416 / m14;
    }
    const okScale =
      Number.isFinite(ratio) && Number.isFinite(marginal)
        ? ratio <= TARGETS.maxPerRowRatio16x && marginal > 0 && marginal <= TARGETS.maxPerRowRatio16x
        : null;
    verdicts.push({ target: 'time-per-row-16x-within-1.2x', ok: okScale, value: ratio, marginalRatio: marginal });
    log(
      `${pf(okScale)}  scaling${star(s1) || star(s16)}: audit wall time per stop_times row ${per1.toFixed(2)} µs at 1x, ${s4 ? usPerRow(s4.audit, s4.rows).toFixed(2) + ' µs at 4x, ' : ''}${per16.toFixed(2)} µs at 16x: 16x/1x = ${fmtX(ratio)} (target <= ${TARGETS.maxPerRowRatio16x}x)`,
    );
    log(
      `      and marginal CPU time per added row ${m14.toFixed(2)} µs (1x->4x), ${m416.toFixed(2)} µs (4x->16x): ${fmtX(marginal)} (must also be <= ${TARGETS.maxPerRowRatio16x}x: no growth faster than the rows)`,
    );
    if (s4 && !s4.inflate.error && !s16.inflate.error)
      log(
        `      floor (a) marginal CPU per added row: ${(((s16.inflate.cpuMs - s4.inflate.cpuMs) * 1000) / (s16.rows - s4.rows)).toFixed(2)} µs`,
      );
    // Judged on what the audit holds once done (heap and buffers in use after a full collection, from the
    // stages run), not on peak RSS: the peak also holds the garbage collector's slack, and V8 widens its
    // young generation (up to 16 MiB semi-spaces) as more is allocated, which alone adds tens of MB
    // between 1x and 16x however little is kept. The peak RSS growth is printed beside it.
    const held = (r) => r.stages?.heldMB;
    const grewHeldMB = held(s16) - held(s1);
    const perRowB = (grewHeldMB * 2 ** 20) / (s16.rows - s1.rows);
    const okMem = Number.isFinite(perRowB) ? perRowB <= TARGETS.maxBytesPerAddedRow : null;
    verdicts.push({ target: 'memory-not-growing-with-rows', ok: okMem, value: perRowB });
    const fmtHeld = (r) => (Number.isFinite(held(r)) ? held(r).toFixed(1) : 'n/a');
    log(
      `${pf(okMem)}  scaling${star(s1) || star(s16)}: memory held after the audit ${fmtHeld(s1)} MB at 1x, ${s4 ? fmtHeld(s4) + ' MB at 4x, ' : ''}${fmtHeld(s16)} MB at 16x: ${Number.isFinite(perRowB) ? perRowB.toFixed(1) : 'n/a (needs the stages run)'} bytes per added stop_times row (target <= ${TARGETS.maxBytesPerAddedRow}: rows not retained)`,
    );
    const grewMB = s16.audit.maxRssMB - s1.audit.maxRssMB;
    log(
      `      peak memory (max RSS, with the collector's slack) ${fmtMB(s1.audit.maxRssMB)} MB at 1x, ${s4 ? fmtMB(s4.audit.maxRssMB) + ' MB at 4x, ' : ''}${fmtMB(s16.audit.maxRssMB)} MB at 16x: ${((grewMB * 2 ** 20) / (s16.rows - s1.rows)).toFixed(1)} bytes per added row`,
    );
  } else log('n/a   scaling series: not measured');

  // The README table.
  const md = [
    `Measured ${date} on ${machine}; median of ${opts.runs} runs (scaling series: at least 5), each in its own process. Floor (a) = inflating stop_times.txt and counting its lines.`,
    '',
    '| input | stop_times rows | audit wall | audit CPU | audit peak memory | held after the audit | floor (a) wall | CSV reader wall | audit / floor (a) |',
    '| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |',
    ...results.map((r) => {
      const heldCell = Number.isFinite(r.stages?.heldMB) ? `${r.stages.heldMB.toFixed(1)} MB` : 'n/a';
      return r.audit.error
        ? `| ${r.name} | ${fmtInt(r.rows)} | n/a | n/a | n/a | ${heldCell} | ${fmtS(r.inflate.wallMs)} s | ${r.csv.error ? 'n/a' : fmtS(r.csv.wallMs) + ' s'} | n/a |`
        : `| ${r.name}${star(r)} | ${fmtInt(r.rows)} | ${fmtS(r.audit.wallMs)} s | ${fmtS(r.audit.cpuMs)} s | ${fmtMB(r.audit.maxRssMB)} MB | ${heldCell} | ${fmtS(r.inflate.wallMs)} s | ${r.csv.error ? 'n/a' : fmtS(r.csv.wallMs) + ' s'} | ${fmtX(r.audit.wallMs / r.inflate.wallMs)} |`;
    }),
    ...(fallback
      ? ['', '\\* the library stages (readFeed, buildPatterns, runAudit, writeReport) in one process, as `stopspan audit` did not run.']
      : []),
  ].join('\n');
  log('');
  log('README table');
  log(md);
  if (opts.noSave) return;
  fs.mkdirSync(benchOut, { recursive: true });
  fs.writeFileSync(path.join(benchOut, 'bench-results.md'), md + '\n');
  const saved = {
    date,
    machine,
    runs: opts.runs,
    loadAtStart: opts.loadAtStart,
    loadAtEnd: os.loadavg(),
    targets: TARGETS,
    verdicts,
    results,
  };
  fs.writeFileSync(path.join(benchOut, 'bench-results.json'), JSON.stringify(saved, null, 2) + '\n');
}

/** Self time per function of a .cpuprofile, hottest first, and per file. */
export function summariseProfile(profile) {
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const selfUs = new Map();
  let totalUs = 0;
  for (let i = 0; i < profile.samples.length; i++) {
    const dt = profile.timeDeltas[i + 1] ?? 0; // the time until the next sample belongs to this one
    selfUs.set(profile.samples[i], (selfUs.get(profile.samples[i]) ?? 0) + dt);
    totalUs += dt;
  }
  const fns = new Map();
  const files = new Map();
  for (const [id, us] of selfUs) {
    const cf = byId.get(id).callFrame;
    const file = cf.url ? cf.url.replace(/^file:\/\//, '').replace(repoDir + '/', '') : '';
    const key = `${cf.functionName || '(anonymous)'}\t${file}:${cf.lineNumber + 1}`;
    fns.set(key, (fns.get(key) ?? 0) + us);
    const fkey = file || cf.functionName;
    files.set(fkey, (files.get(fkey) ?? 0) + us);
  }
  const rank = (m) => [...m.entries()].sort((a, b) => b[1] - a[1]).map(([k, us]) => ({ key: k, ms: us / 1000, pct: (100 * us) / totalUs }));
  return { totalMs: totalUs / 1000, functions: rank(fns), files: rank(files) };
}

async function profileAudit(opts) {
  const feedArg = opts.profile;
  const dir = feedsDir(opts.feeds);
  const candidates = [feedArg, path.join(dir, `${feedArg}.zip`), path.join(benchOut, 'scaled', `${feedArg}.zip`)];
  const feed = candidates.find((f) => fs.existsSync(f));
  if (!feed) throw new Error(`invalid option --profile: no feed at ${candidates.join(' or ')}`);
  const profDir = path.join(benchOut, 'prof');
  fs.mkdirSync(profDir, { recursive: true });
  const before = new Set(fs.readdirSync(profDir));
  const outDir = fs.mkdtempSync(path.join(os.tmpdir(), 'stopspan-prof-'));
  const r = spawnSync(process.execPath, ['--cpu-prof', `--cpu-prof-dir=${profDir}`, mainJs(), 'audit', feed, '--out', outDir, '--force'], {
    cwd: repoDir,
    encoding: 'utf8',
  });
  fs.rmSync(outDir, { recursive: true, force: true });
  if (r.status !== 0) note(`bench: audit exited ${r.status}: ${r.stderr.trim().split('\n').slice(-3).join(' | ')}`);
  const made = fs.readdirSync(profDir).filter((f) => f.endsWith('.cpuprofile') && !before.has(f));
  if (!made.length) throw new Error('no profile was written');
  const file = path.join(profDir, made[0]);
  const s = summariseProfile(JSON.parse(fs.readFileSync(file, 'utf8')));
  log(`profile of stopspan audit ${path.basename(feed)}: ${(s.totalMs / 1000).toFixed(2)} s sampled; ${path.relative(repoDir, file)}`);
  log('');
  printTable(
    ['self %', 'self ms', 'function', 'where'],
    s.functions.slice(0, opts.top).map((f) => [f.pct.toFixed(1), f.ms.toFixed(0), ...f.key.split('\t')]),
    [true, true, false, false],
  );
  log('');
  printTable(
    ['self %', 'self ms', 'file'],
    s.files.slice(0, opts.top).map((f) => [f.pct.toFixed(1), f.ms.toFixed(0), f.key]),
    [true, true, false],
  );
}

async function main() {
  const opts = parseArgs(process.argv.slice(2));
  if (opts.report) {
    const saved = JSON.parse(fs.readFileSync(opts.report, 'utf8'));
    return report(saved.results, {
      ...opts,
      runs: saved.runs,
      loadAtStart: saved.loadAtStart ?? [NaN, NaN, NaN],
      date: saved.date,
      machine: saved.machine,
      noSave: true,
    });
  }
  if (opts.build) build();
  else distDir = path.join(repoDir, 'dist');
  if (opts.profile) return profileAudit(opts);
  opts.loadAtStart = os.loadavg();
  const inputs = collectInputs(opts);
  if (!inputs.length) throw new Error('nothing to measure');
  if (!fs.existsSync(mainJs())) note(`bench: ${mainJs()} is missing; the audit column will be n/a`);
  const results = [];
  // the scaling series is cheap and its steps are small beside start-up, so it gets at least 5 runs
  for (const input of inputs)
    results.push(await benchInput(input, input.kind === 'scaled' ? Math.max(5, opts.runs) : opts.runs, opts.stages));
  report(results, opts);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((e) => {
    process.stderr.write(`bench: ${e?.message ?? e}\n`);
    process.exitCode = 2;
  });
}
