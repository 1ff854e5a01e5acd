// check with other feeds as context (--context): the context feeds are read on the analysis date as the
// audit reads them (an unreadable one exits 2 naming it), and the report counts the stops served within
// 150 m of one of their stations, with examples, and says when a context feed has no service on the date.
// The built command on the clean check fixture (invented city of Vellmoor) with a hand-made metro feed.
import { mkdtempSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT, runCli } from '../helpers/cli.js';

const work = mkdtempSync(join(tmpdir(), 'stopspan-check-context-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));
const CLEAN = join(ROOT, 'fixtures/check/clean');

// [D] 60 m of latitude: 60 / 111 320 degrees (2 pi x 6 378 km / 360 metres per degree)
const DEG_60M = 60 / 111_320;

function metroFolder(name: string, endDate = '20271231'): string {
  const dir = join(work, name);
  mkdirSync(dir, { recursive: true });
  // 60 m north of S3 (Vellmoor Havenstraat), and one far away
  writeFileSync(
    join(dir, 'stops.txt'),
    `stop_id,stop_name,stop_lat,stop_lon,location_type\nH,Havenplein,${52.37 + DEG_60M},4.9117835,1\nF,Vellmoor Noord,52.40,4.90,1\n`,
  );
  writeFileSync(
    join(dir, 'calendar.txt'),
    `service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWK,1,1,1,1,1,0,0,20260101,${endDate}\n`,
  );
  return dir;
}

describe('stopspan check --context', () => {
  it('counts the stops served beside a context station, in the JSON (schema-valid) and the text', async () => {
    const metro = metroFolder('vellmoor-metro');
    const r = await runCli(['check', CLEAN, '--today', '2026-10-14', '--context', metro, '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    // JSON Schema 2020-12 [C], checked by ajv
    const validate = new Ajv2020.default({ allErrors: true, strict: true, allowUnionTypes: true, validateFormats: false }).compile(
      JSON.parse(readFileSync(join(ROOT, 'schema/check.schema.json'), 'utf8')),
    );
    validate(doc);
    expect(validate.errors ?? []).toEqual([]);
    expect(doc.context).toEqual({
      feeds: [{ label: 'vellmoor-metro', stations: 2, services_on_date: 1 }],
      stops_near_stations: 1,
      examples: [{ stop_id: 'S3', stop_name: 'Vellmoor Havenstraat', station: 'station Havenplein (vellmoor-metro), 60 m' }],
    });
    const text = await runCli(['check', CLEAN, '--today', '2026-10-14', '--context', metro]);
    expect(text.stdout).toContain(
      'context vellmoor-metro (2 stations): 1 stop(s) served within 150 m of a station, transfer points the audit keeps\n        S3 Vellmoor Havenstraat: station Havenplein (vellmoor-metro), 60 m\n',
    );
    const plain = JSON.parse((await runCli(['check', CLEAN, '--today', '2026-10-14', '--json'])).stdout);
    expect(plain.context).toBeNull();
  });

  it('says when a context feed has no service on the date', async () => {
    const r = await runCli(['check', CLEAN, '--today', '2026-10-14', '--context', metroFolder('vellmoor-metro-old', '20260601')]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('context vellmoor-metro-old (2 stations, no service on the date): 1 stop(s)');
  });

  it('exits 2 with one line naming an unreadable context feed', async () => {
    const r = await runCli(['check', CLEAN, '--today', '2026-10-14', '--context', join(work, 'no-such-metro.zip')]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^error: .*context feed .*no-such-metro\.zip.*\n$/);
  });
});
