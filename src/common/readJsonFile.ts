// Reads a small JSON file a user names (parameters, scenarios): one place for the byte order mark and for
// the two errors, cannot read and not JSON, each naming the file.

import { readFileSync } from 'node:fs';
import { StopspanError, type ErrorCode } from './errors.js';

/** The parsed JSON of `path`; `label` names the file in errors ("parameters file", "scenario file"). */
export function readJsonFile(path: string, code: ErrorCode, label: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new StopspanError(code, `cannot read ${label}: ${(e as Error).message}`, { file: path });
  }
  try {
    return JSON.parse(text.replace(/^\uFEFF/, ''));
  } catch (e) {
    throw new StopspanError(code, `${label} is not valid JSON: ${(e as Error).message}`, { file: path });
  }
}
