// Writes a what-if folder (index.html and scenario.json) atomically: the files go into a temporary
// sibling folder that is then renamed into place, so a failed run never leaves half a folder. An existing
// folder is replaced only with force, and put back if the replacement fails.

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

const suffix = (): string => `${process.pid}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`;

/** Writes files (name -> text) as the folder outDir; returns the paths written. */
export async function writeWhatifFolder(outDir: string, files: Record<string, string>, { force = false }: { force?: boolean } = {}): Promise<string[]> {
  if (typeof outDir !== 'string' || outDir.trim() === '') {
    throw new StopspanError('bad-option', 'invalid option --out: expected a folder path, got an empty string', { value: String(outDir) });
  }
  for (const name of Object.keys(files)) {
    if (!/^[A-Za-z0-9._-]+$/.test(name) || name.startsWith('.')) throw new StopspanError('bad-option', `invalid output file name ${name}`, { value: name });
  }
  const target = resolve(outDir);
  if (!force && (await exists(target))) {
    throw new StopspanError('output-exists', `output folder ${outDir} already exists; choose another folder or pass --force to replace it`, { file: outDir });
  }
  const parent = dirname(target);
  await mkdir(parent, { recursive: true });
  const tmp = join(parent, `.${basename(target)}.tmp-${suffix()}`);
  let old: string | null = null;
  try {
    await mkdir(tmp);
    for (const [name, text] of Object.entries(files)) await writeFile(join(tmp, name), text, 'utf8');
    if (await exists(target)) {
      if (!force) throw new StopspanError('output-exists', `output folder ${outDir} appeared while it was being written; pass --force to replace it`, { file: outDir });
      old = join(parent, `.${basename(target)}.old-${suffix()}`);
      await rename(target, old);
    }
    await rename(tmp, target);
  } catch (e) {
    await rm(tmp, { recursive: true, force: true });
    if (old !== null && !(await exists(target))) await rename(old, target);
    throw e;
  }
  if (old !== null) await rm(old, { recursive: true, force: true });
  return Object.keys(files).map((n) => join(target, n));
}
