// Reads a local data file (ridership, land use) 1 MiB at a time into a push parser, so a large file is never
// held whole; a file that cannot be opened or read stops the run with the caller's coded error naming it.

import { closeSync, openSync, readSync } from 'node:fs';
import { StopspanError, type ErrorCode } from './errors.js';

/** Hands `file`'s bytes to `onPiece` in order, 1 MiB at a time (each piece is valid only during the call). */
export function readInPieces(file: string, onPiece: (piece: Buffer) => void, code: ErrorCode, what: string): void {
  const cannot = (e: unknown) => new StopspanError(code, `cannot read ${what}: ${(e as Error).message}`, { file });
  let fd: number;
  try {
    fd = openSync(file, 'r');
  } catch (e) {
    throw cannot(e);
  }
  try {
    const buf = Buffer.alloc(1 << 20);
    for (;;) {
      let n: number;
      try {
        n = readSync(fd, buf, 0, buf.length, null);
      } catch (e) {
        throw cannot(e);
      }
      if (n === 0) break;
      onPiece(buf.subarray(0, n));
    }
  } finally {
    closeSync(fd);
  }
}
