// Writes an output folder atomically: every file goes into a temporary sibling folder, which is then
// renamed into place, so an interrupted or failed run never leaves a half-written folder. An existing
// folder is replaced only with force, and put back if the replacement fails. Shared by every command
// that writes a report folder; the only place in src/report that touches the disk.

import { mkdir, rename, rm, stat, writeFile } from 'node:fs/promises';
import { basename, dirname, join, resolve } from 'node:path';
import { StopspanError } from '../common/errors.js';

async function exists(path: string): Promise<boolean> {
  try {
    await stat(path);
    return true;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return false;
    throw e;
  }
}

function uniqueSuffix(): string {
  return `${process.pid}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`;
}

/**
 * Writes files (name -> text, or a function rendering it; rendered inside the temporary folder's life so
 * a failing renderer leaves nothing) as the folder outDir. Returns the paths written, in order.
 * Throws 'output-exists' when outDir exists and force is not set; 'bad-option' for an empty path or a
 * file name that is not a plain name.
 */
export async function writeFolder(
  outDir: string,
  files: [name: string, content: string | (() => string)][],
  { force = false }: { force?: boolean } = {},
): Promise<string[]> {
  if (typeof outDir !== 'string' || outDir.trim() === '') {
    throw new StopspanError('bad-option', 'invalid option out: expected a folder path, got an empty string', { value: String(outDir) });
  }
  for (const [name] of files) {
    if (!/^[A-Za-z0-9._-]+$/.test(name) || name.startsWith('.')) throw new StopspanError('bad-option', `invalid output file name ${name}`, { value: name });
  }
  const target = resolve(outDir);
  if (!force && (await exists(target))) {
    throw new StopspanError('output-exists', `output folder ${outDir} already exists; choose another folder or pass --force to replace it`, { file: outDir });
  }
  const parent = dirname(target);
  await mkdir(parent, { recursive: true });
  const tmp = join(parent, `.${basename(target)}.tmp-${uniqueSuffix()}`);
  let old: string | null = null;
  try {
    await mkdir(tmp);
    for (const [name, content] of files) {
      await writeFile(join(tmp, name), typeof content === 'function' ? content() : content, 'utf8');
    }
    if (await exists(target)) {
      if (!force) {
        throw new StopspanError('output-exists', `output folder ${outDir} appeared while it was being written; pass --force to replace it`, { file: outDir });
      }
      old = join(parent, `.${basename(target)}.old-${uniqueSuffix()}`);
      await rename(target, old);
    }
    await rename(tmp, target);
  } catch (e) {
    await rm(tmp, { recursive: true, force: true });
    if (old !== null && !(await exists(target))) await rename(old, target); // put the previous folder back
    throw e;
  }
  if (old !== null) await rm(old, { recursive: true, force: true });
  return files.map(([n]) => join(target, n));
}
