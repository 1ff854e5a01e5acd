// Seeded floods of per-trip structure through the built CLI: a row repeated many times in its trip, many
// short trips (each its own route pattern), stops at one point or a metre apart, a trip past the cap of
// rows, in random mixes. Each run must end in exit 0 with a report whose warnings count what was dropped,
// or exit 2 with one `error:` line and no folder; never exit 3, a signal or a stack trace; and within the
// bounds the README states for hostile input (30 s, 1 GB). Seeded for replay: STOPSPAN_FUZZ_SEED=<n>.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { CLI } from '../helpers/cli.js';
// @ts-expect-error: a plain ES module of the generators, without type declarations
import { prng, hms } from '../../scripts/lib/seeded.mjs';

const SEED = process.env.STOPSPAN_FUZZ_SEED !== undefined ? Number(process.env.STOPSPAN_FUZZ_SEED) : 20261204;
const RUNS = Number(process.env.STOPSPAN_FUZZ_RUNS ?? 6);
console.log(`test/fuzz/trip-structure.test.ts: seed ${SEED} (replay with STOPSPAN_FUZZ_SEED=${SEED}), ${RUNS} CLI runs`);

const TIME = existsSync('/usr/bin/time') ? '/usr/bin/time' : null; // for the peak memory (GNU time -f %M)
const work = mkdtempSync(join(tmpdir(), 'stopspan-trip-fuzz-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

interface Mix {
  repeats: number; // times one row of the first trip is repeated after itself
  shortTrips: number; // two-stop trips, each with its own stop list
  pointStops: number; // stops of one trip all at one point
  metreStops: number; // stops of one trip a metre apart
  longTrip: boolean; // a trip of 10 001 rows, past the cap
}

function drawMix(rand: () => number): Mix {
  const pick = <T>(xs: T[]): T => xs[Math.floor(rand() * xs.length)];
  return {
    repeats: pick([0, 0, 1, 5_000, 200_000]),
    shortTrips: pick([0, 0, 50, 3_000, 10_500]),
    pointStops: pick([0, 0, 40, 2_000]),
    metreStops: pick([0, 0, 40, 3_000]),
    longTrip: rand() < 0.15,
  };
}

/** Writes a Vellmoor feed holding the mix as a folder. */
function writeMix(dir: string, mix: Mix): void {
  const stops = ['stop_id,stop_name,stop_lat,stop_lon'];
  const trips = ['route_id,service_id,trip_id'];
  const st: string[] = ['trip_id,arrival_time,departure_time,stop_id,stop_sequence'];
  const addTrip = (id: string, stopIds: string[], startS: number) => {
    trips.push(`V1,WKDY,${id}`);
    stopIds.forEach((s, k) => {
      const end = k === 0 || k === stopIds.length - 1;
      const t = end ? hms(startS + (k === 0 ? 0 : 60 * stopIds.length)) : '';
      st.push(`${id},${t},${t},${s},${k + 1}`);
      if (id === 'MAIN' && k === 1) for (let r = 0; r < mix.repeats; r++) st.push(`${id},,,${s},${k + 1}`);
    });
  };
  // an ordinary trip: 12 stops 300 m apart along Mill Lane
  const main = Array.from({ length: 12 }, (_, k) => `M${k}`);
  main.forEach((s, k) => stops.push(`${s},Mill Ln ${k},45.020000,${(10.03 + k * 0.00381).toFixed(6)}`));
  addTrip('MAIN', main, 7 * 3600);
  if (mix.shortTrips > 0) {
    const side = Math.ceil(Math.sqrt(mix.shortTrips)) + 1;
    for (let k = 0; k < side; k++)
      stops.push(`G${k},Grid ${k},${(45.03 + (k % 100) * 0.00045).toFixed(6)},${(10.03 + Math.floor(k / 100) * 0.00064).toFixed(6)}`);
    let t = 0;
    for (let a = 0; a < side && t < mix.shortTrips; a++)
      for (let b = 0; b < side && t < mix.shortTrips; b++) if (a !== b) addTrip(`G${t++}`, [`G${a}`, `G${b}`], 8 * 3600);
  }
  if (mix.pointStops > 0) {
    const ids = Array.from({ length: mix.pointStops }, (_, k) => `P${k}`);
    ids.forEach((s) => stops.push(`${s},Ferry St,45.010000,10.040000`));
    addTrip('POINT', ids, 9 * 3600);
  }
  if (mix.metreStops > 0) {
    const ids = Array.from({ length: mix.metreStops }, (_, k) => `E${k}`);
    ids.forEach((s, k) => stops.push(`${s},Quay ${k},45.000000,${(10.03 + k / 78_700).toFixed(7)}`));
    addTrip('METRE', ids, 10 * 3600);
  }
  if (mix.longTrip)
    addTrip(
      'LONG',
      Array.from({ length: 10_001 }, (_, k) => main[k % main.length]),
      11 * 3600,
    );
  mkdirSync(dir, { recursive: true });
  writeFileSync(
    join(dir, 'agency.txt'),
    'agency_id,agency_name,agency_url,agency_timezone\nVTA,Vellmoor Transit Authority,https://transit.vellmoor.example/,Etc/GMT-1\n',
  );
  writeFileSync(join(dir, 'routes.txt'), 'route_id,agency_id,route_short_name,route_long_name,route_type\nV1,VTA,V1,Vellmoor Circle,3\n');
  writeFileSync(
    join(dir, 'calendar.txt'),
    'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWKDY,1,1,1,1,1,0,0,20261102,20270331\n',
  );
  writeFileSync(join(dir, 'stops.txt'), stops.join('\n') + '\n');
  writeFileSync(join(dir, 'trips.txt'), trips.join('\n') + '\n');
  writeFileSync(join(dir, 'stop_times.txt'), st.join('\n') + '\n');
}

describe('per-trip structure floods through the CLI', () => {
  it(`end in exit 0 with counted warnings or exit 2 with one line, within 30 s and 1 GB (seed ${SEED}, ${RUNS} runs)`, () => {
    const rand = prng(SEED);
    const seen = { 0: 0, 2: 0 };
    for (let run = 0; run < RUNS; run++) {
      const mix = drawMix(rand);
      const feed = join(work, `feed-${run}`);
      const out = join(work, `out-${run}`);
      writeMix(feed, mix);
      const args = [CLI, 'audit', feed, '--out', out, '--quiet'];
      const t0 = performance.now();
      const r = TIME
        ? spawnSync(TIME, ['-q', '-f', 'peak-kb %M', process.execPath, ...args], { encoding: 'utf8', timeout: 60_000 })
        : spawnSync(process.execPath, args, { encoding: 'utf8', timeout: 60_000 });
      const seconds = (performance.now() - t0) / 1000;
      const peakLine = TIME ? (r.stderr.match(/peak-kb (\d+)\s*$/) ?? null) : null;
      const stderr = peakLine ? r.stderr.slice(0, peakLine.index).trimEnd() : r.stderr.trimEnd();
      const what = `seed ${SEED} run ${run} ${JSON.stringify(mix)}: exit ${r.status}, signal ${r.signal}, ${seconds.toFixed(1)} s, stderr ${JSON.stringify(stderr.slice(0, 400))}`;
      expect(r.signal, what).toBeNull();
      expect(stderr, what).not.toMatch(/^\s+at /m);
      expect(seconds, what).toBeLessThan(30);
      if (peakLine) expect(Number(peakLine[1]) / 1024, what).toBeLessThan(1000);
      if (r.status === 2) {
        expect(stderr.split('\n'), what).toHaveLength(1);
        expect(stderr, what).toMatch(/^error: /);
        expect(existsSync(out), what).toBe(false);
        // the caps this mix passes are the ones a refusal may name
        if (!mix.longTrip && mix.shortTrips <= 10_000) throw new Error(`refused within the caps: ${what}`);
        seen[2]++;
      } else {
        expect(r.status, what).toBe(0);
        expect(mix.longTrip || mix.shortTrips > 10_000, `accepted past a cap: ${what}`).toBe(false);
        const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
        const counted = JSON.stringify(summary);
        if (mix.repeats > 0) expect(counted, what).toContain('repeated-stop-sequence');
        seen[0]++;
      }
      rmSync(feed, { recursive: true, force: true });
      rmSync(out, { recursive: true, force: true });
    }
    expect(seen[0] + seen[2]).toBe(RUNS);
  }, 600_000);
});
