// The one reader of local data files (ridership, land use): every byte in order, in pieces of at most
// 1 MiB, and a file that cannot be read is the caller's coded error naming it.
import { afterAll, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readInPieces } from '../../src/common/readInPieces.js';
import { StopspanError } from '../../src/common/errors.js';
import { loadRidership } from '../../src/model/ridership.js';
import { readLandUse } from '../../src/landuse/readLandUse.js';
import { WarningSink } from '../../src/common/warnings.js';
import { handmadeNetwork } from '../helpers/handmade.js';

const dir = mkdtempSync(join(tmpdir(), 'stopspan-pieces-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('readInPieces', () => {
  it('hands over every byte in order, in pieces of at most 1 MiB (the same SHA-256 as node hashing the file whole)', () => {
    const bytes = Buffer.alloc(2.5 * 2 ** 20 + 7);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 31 + (i >> 11)) & 0xff;
    const file = join(dir, 'big.bin');
    writeFileSync(file, bytes);
    const sizes: number[] = [];
    const hash = createHash('sha256');
    readInPieces(file, (p) => (sizes.push(p.length), hash.update(p)), 'bad-ridership', 'ridership file');
    expect(sizes).toEqual([2 ** 20, 2 ** 20, 0.5 * 2 ** 20 + 7]);
    expect(hash.digest('hex')).toBe(createHash('sha256').update(bytes).digest('hex'));
  });

  it('makes a missing file the ridership or land-use error, naming the file', () => {
    const missing = join(dir, 'no-such.csv');
    const { feed } = handmadeNetwork({ tripsPerDay: 10 });
    for (const run of [() => loadRidership(missing, feed, { warnings: new WarningSink() }), () => readLandUse(missing)]) {
      let err: unknown;
      try {
        run();
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(StopspanError);
      expect((err as StopspanError).context.file).toBe(missing);
      expect((err as StopspanError).message).toMatch(/^cannot read (ridership|land-use) file: ENOENT/);
    }
  });
});
