// A trip of 2 000 stops at one point (or a metre apart) once kept the audit busy for minutes: every stop
// fell inside the walking policy's gap, so the optimiser's window was the whole trip. The window is now
// bounded by count as well as distance; the audit of such a feed must end in seconds. The limit below is
// generous on purpose (speed targets live in the benchmark).
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../helpers/cli.js';

/** A Vellmoor feed folder with one trip of `n` stops, `stepM` metres apart along a street (0: one point). */
function longTripFeed(n: number, stepM: number): string {
  const dir = mkdtempSync(join(tmpdir(), 'stopspan-longtrip-'));
  const mPerDegLat = 111_195;
  writeFileSync(
    join(dir, 'agency.txt'),
    'agency_id,agency_name,agency_url,agency_timezone\nVT,Vellmoor Transit,https://vellmoor.example,Europe/Amsterdam\n',
  );
  writeFileSync(join(dir, 'routes.txt'), 'route_id,agency_id,route_short_name,route_type\nV9,VT,9,3\n');
  writeFileSync(
    join(dir, 'calendar.txt'),
    'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWK,1,1,1,1,1,0,0,20260101,20261231\n',
  );
  writeFileSync(join(dir, 'trips.txt'), 'route_id,service_id,trip_id\nV9,WK,T1\nV9,WK,T2\n');
  const stops = ['stop_id,stop_name,stop_lat,stop_lon'];
  for (let k = 0; k < n; k++) stops.push(`S${k},Vellmoor ${k},${(52.37 + (k * stepM) / mPerDegLat).toFixed(7)},4.9`);
  writeFileSync(join(dir, 'stops.txt'), stops.join('\n') + '\n');
  const st = ['trip_id,arrival_time,departure_time,stop_id,stop_sequence'];
  for (const [trip, start] of [
    ['T1', 8],
    ['T2', 9],
  ] as const) {
    for (let k = 0; k < n; k++) {
      const s = start * 3600 + k * 2;
      const t = `${String(Math.floor(s / 3600)).padStart(2, '0')}:${String(Math.floor(s / 60) % 60).padStart(2, '0')}:${String(s % 60).padStart(2, '0')}`;
      st.push(`${trip},${t},${t},S${k},${k + 1}`);
    }
  }
  writeFileSync(join(dir, 'stop_times.txt'), st.join('\n') + '\n');
  return dir;
}

describe('a trip of very many stops close together', () => {
  for (const [label, stepM] of [
    ['coincident', 0],
    ['a metre apart', 1],
  ] as const) {
    it(`audits 2 000 ${label} stops in seconds, not minutes`, async () => {
      const dir = longTripFeed(2000, stepM);
      try {
        const out = join(dir, 'report');
        const t0 = performance.now();
        const run = await runCli(['audit', dir, '--out', out, '--format', 'json', '-q']);
        const seconds = (performance.now() - t0) / 1000;
        expect(run.stderr).toBe('');
        expect(run.code).toBe(0);
        expect(seconds).toBeLessThan(30);
        const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
        expect(summary.counts.patterns).toBe(1);
        // a metre apart, hundreds of candidates share the one pattern: ranking them as a programme would
        // take minutes, so they are weighed alone and the summary says so
        if (summary.counts.candidates > 100)
          expect(summary.warnings.map((w: { code: string }) => w.code)).toContain('candidates-weighed-alone');
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
    }, 120_000);
  }
});
