// A small PNG reader for tests: inflates the image data (node:zlib) and measures how varied it is, so a
// test can tell a drawn page from a blank one without an image library. PNG layout per RFC 2083 /
// the W3C PNG specification: 8-byte signature, then chunks of length, type, data, CRC; IDAT chunks
// concatenated form one zlib stream.

import { inflateSync } from 'node:zlib';

export interface PngStats {
  width: number;
  height: number;
  distinctBytes: number; // distinct byte values in the filtered scanlines
  nonZeroShare: number; // share of non-zero bytes in the filtered scanlines
}

export function pngStats(png: Buffer): PngStats {
  const sig = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  if (!sig.every((b, i) => png[i] === b)) throw new Error('not a PNG');
  let off = 8;
  let width = 0;
  let height = 0;
  const idat: Buffer[] = [];
  while (off < png.length) {
    const len = png.readUInt32BE(off);
    const type = png.toString('ascii', off + 4, off + 8);
    const data = png.subarray(off + 8, off + 8 + len);
    if (type === 'IHDR') {
      width = data.readUInt32BE(0);
      height = data.readUInt32BE(4);
    } else if (type === 'IDAT') idat.push(data);
    else if (type === 'IEND') break;
    off += 12 + len;
  }
  const raw = inflateSync(Buffer.concat(idat));
  const seen = new Set<number>();
  let nonZero = 0;
  for (const b of raw) {
    seen.add(b);
    if (b !== 0) nonZero++;
  }
  return { width, height, distinctBytes: seen.size, nonZeroShare: nonZero / raw.length };
}

/** A page is "drawn" when its image data holds many different values, not one flat colour. */
export function looksDrawn(s: PngStats): boolean {
  return s.distinctBytes >= 32 && s.nonZeroShare > 0.001;
}
