// The one writer of output folders, used by every command that writes one. A folder is written atomically:
// every file goes into a temporary sibling folder (`.NAME.tmp-PID-…`), which is then renamed into place,
// so an interrupted or failed run never leaves a half-written folder. Each folder gets a marker file
// (REPORT_MARKER) naming the files written with it; an existing folder is replaced only with force, and
// only when it holds nothing but such a previous output (the marker and the names it lists), never the
// working folder or one above it, the home folder, the root, a folder holding an input, a file or a link.
// Temporary folders left by a killed run (their pid no longer alive) are swept on the next write beside
// them. The only place in src/report that touches the disk, but for the GeoPackage, which SQLite writes
// into the temporary folder at the path this hands it (a FileWriter).

import { lstatSync, renameSync, rmSync } from 'node:fs';
import { lstat, mkdir, readdir, readFile, realpath, rename, rm, rmdir, stat, writeFile } from 'node:fs/promises';
import { homedir } from 'node:os';
import { basename, dirname, join, resolve, sep } from 'node:path';
import { StopspanError } from '../common/errors.js';
import { staleRunFolders, undoOnInterrupt } from '../common/interrupts.js';
import { version } from '../version.js';

/** The marker file written into every output folder: which tool wrote it, and the files it wrote. */
export const REPORT_MARKER = '.stopspan-report.json';

/** A file written by other means than text (the GeoPackage): given its path inside the temporary folder. */
export interface FileWriter {
  writeTo(path: string): void | Promise<void>;
}

export interface WriteFolderOptions {
  /** Replace an existing folder that holds a previous output of this tool. */
  force?: boolean;
  /** Files and folders this run reads (feed, ridership, parameters, ...): a folder holding one is never replaced. */
  inputs?: (string | undefined)[];
}

/** `.NAME.tmp-PID-TIME-RANDOM` (being written), `.NAME.old-PID-TIME-RANDOM` (a previous output moved aside) and
 * `.NAME.probe-PID-TIME-RANDOM` (the empty folder that proves the place can be written). */
const TEMP_NAME = /^\.(.+)\.(tmp|old|probe)-(\d+)-[a-z0-9]+-[a-z0-9]+$/;

function tempName(target: string, kind: 'tmp' | 'old' | 'probe'): string {
  const suffix = `${process.pid}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8).padEnd(6, '0')}`;
  return join(dirname(target), `.${basename(target)}.${kind}-${suffix}`);
}

function refuse(outDir: string, why: string): never {
  throw new StopspanError('bad-output', `cannot use this as the output folder: ${why}`, { file: outDir });
}

function errno(e: unknown): string {
  return (e as NodeJS.ErrnoException)?.code ?? '';
}

/** Words for the system errors a planner meets when a folder cannot be written. */
function reason(e: unknown): string {
  const code = errno(e);
  const words: Record<string, string> = {
    EACCES: 'permission denied',
    EPERM: 'permission denied',
    EROFS: 'read-only file system',
    ENOSPC: 'no space left on the device',
    ENOTDIR: 'a part of the path is a file, not a folder',
    ENOENT: 'the folder cannot be created there',
    ELOOP: 'too many symbolic links',
    ENAMETOOLONG: 'the path is too long',
  };
  return words[code] ?? (code || (e as Error)?.message || String(e));
}

async function lstatOrNull(path: string): Promise<Awaited<ReturnType<typeof lstat>> | null> {
  try {
    return await lstat(path);
  } catch (e) {
    if (errno(e) === 'ENOENT') return null;
    throw e;
  }
}

function isInside(child: string, folder: string): boolean {
  return child === folder || child.startsWith(folder.endsWith(sep) ? folder : folder + sep);
}

async function realOrSelf(path: string): Promise<string> {
  try {
    return await realpath(path);
  } catch {
    return resolve(path);
  }
}

/** The file names a folder's marker lists, or null when the folder has no readable marker of this tool. */
async function markedNames(folder: string): Promise<Set<string> | null> {
  try {
    const doc = JSON.parse(await readFile(join(folder, REPORT_MARKER), 'utf8')) as { writtenBy?: unknown; files?: unknown };
    if (doc.writtenBy !== 'stopspan' || !Array.isArray(doc.files) || !doc.files.every((f) => typeof f === 'string')) return null;
    return new Set(doc.files as string[]);
  } catch {
    return null;
  }
}

/** Why the existing folder is not a previous output of this tool, or null when it is one. */
async function notAReport(folder: string): Promise<string | null> {
  const names = await markedNames(folder);
  // an empty folder (made ready for the output, as by mkdtemp) holds nothing to lose
  if (names === null && (await readdir(folder)).length === 0) return null;
  if (names === null)
    return `it exists and is not a stopspan output folder (no ${REPORT_MARKER}); remove it yourself or choose another folder`;
  for (const entry of await readdir(folder, { withFileTypes: true })) {
    if (entry.name === REPORT_MARKER) continue;
    if (!entry.isFile() || !names.has(entry.name)) {
      return `it holds ${entry.name}, which stopspan did not write there; remove it yourself or choose another folder`;
    }
  }
  return null;
}

/**
 * Removes temporary folders of this tool in parent whose run is over: named `.NAME.tmp-PID-…` or
 * `.NAME.old-PID-…` with PID no longer alive, holding only plain files. A previous output moved aside
 * (`.old-`) goes back to NAME when NAME is missing (the run died between the two renames). Returns the
 * paths removed or restored. Never throws: a folder it cannot read is left as it is.
 */
export async function sweepStaleTemp(parent: string): Promise<string[]> {
  const done: string[] = [];
  for (const { path, match: m } of await staleRunFolders(parent, TEMP_NAME, 3)) {
    try {
      const target = join(parent, m[1]);
      if (m[2] === 'old' && (await lstatOrNull(target)) === null) await rename(path, target);
      else await rm(path, { recursive: true, force: true });
      done.push(path);
    } catch {
      // another run is sweeping too, or the folder is not ours to touch
    }
  }
  return done;
}

/**
 * Checks, without writing anything that stays, that outDir can be written with these options: call it
 * before the work, so a run that cannot save its output fails at once. Throws 'bad-option' for an empty
 * path, 'output-exists' for a previous output without force, and 'bad-output' naming the path and why for
 * a path that may not be replaced or cannot be written. Also sweeps stale temporary folders beside it.
 */
export async function checkOutFolder(outDir: string, { force = false, inputs = [] }: WriteFolderOptions = {}): Promise<void> {
  if (typeof outDir !== 'string' || outDir.trim() === '') {
    throw new StopspanError('bad-option', 'invalid option out: expected a folder path, got an empty string', { value: String(outDir) });
  }
  // "-" reads as "standard output" in most tools; a folder of that name would surprise, so it is refused
  if (outDir === '-') {
    throw new StopspanError('bad-option', 'invalid option --out: "-" is not a folder; for the summary on standard output use --json', {
      value: outDir,
    });
  }
  const target = resolve(outDir);
  if (dirname(target) === target) refuse(outDir, 'it is the root folder');
  let st;
  try {
    st = await lstatOrNull(target);
  } catch (e) {
    refuse(outDir, reason(e));
  }
  if (st) {
    if (st.isSymbolicLink()) refuse(outDir, 'it is a symbolic link; give the folder itself');
    if (!st.isDirectory()) refuse(outDir, 'it is a file, not a folder; only a folder stopspan wrote is ever replaced');
    const real = await realOrSelf(target);
    if (isInside(await realOrSelf(process.cwd()), real)) refuse(outDir, 'it is the working folder or a folder above it');
    if (real === (await realOrSelf(homedir()))) refuse(outDir, 'it is the home folder');
    for (const input of inputs) {
      if (!input || /^https?:\/\//i.test(input)) continue;
      // the input itself, and (when it is a link) where it points
      const places = [join(await realOrSelf(dirname(resolve(input))), basename(resolve(input))), await realOrSelf(input)];
      if (places.some((p) => isInside(p, real))) refuse(outDir, `it holds the input ${input}`);
    }
    let why: string | null;
    try {
      why = await notAReport(target);
    } catch (e) {
      refuse(outDir, reason(e));
    }
    if (why !== null) refuse(outDir, why);
    if (!force) {
      throw new StopspanError('output-exists', 'the output folder already exists; choose another folder or pass --force to replace it', {
        file: outDir,
      });
    }
  }
  // the nearest folder that exists on the way up must be a folder this run can write in
  let parent = dirname(target);
  for (;;) {
    let pst;
    try {
      pst = await stat(parent);
    } catch (e) {
      if (errno(e) !== 'ENOENT') refuse(outDir, reason(e));
      if ((await lstatOrNull(parent).catch(() => null))?.isSymbolicLink()) refuse(outDir, `${parent} is a symbolic link to nothing`);
    }
    if (pst) {
      if (!pst.isDirectory()) refuse(outDir, `${parent} is not a folder`);
      break;
    }
    if (dirname(parent) === parent) refuse(outDir, 'no folder on its path exists');
    parent = dirname(parent);
  }
  await sweepStaleTemp(parent);
  const probe = join(parent, basename(tempName(target, 'probe')));
  try {
    await mkdir(probe);
  } catch (e) {
    refuse(outDir, `cannot write in ${parent}: ${reason(e)}`);
  }
  await rmdir(probe).catch(() => undefined);
}

/**
 * Writes files (name -> text, or a function rendering it or giving a FileWriter; rendered inside the
 * temporary folder's life so a failing renderer leaves nothing) and the marker as the folder outDir. Returns the paths written, in
 * order (the marker not among them). Throws as checkOutFolder does, and 'bad-option' for a file name that
 * is not a plain name. An interrupt (see common/interrupts.ts) removes the temporary folder and puts a
 * previous output back.
 */
export async function writeFolder(
  outDir: string,
  files: [name: string, content: string | (() => string | FileWriter)][],
  options: WriteFolderOptions = {},
): Promise<string[]> {
  for (const [name] of files) {
    if (typeof name !== 'string' || !/^[A-Za-z0-9._-]+$/.test(name) || name.startsWith('.')) {
      throw new StopspanError('bad-option', `invalid output file name ${name}`, { value: String(name) });
    }
  }
  await checkOutFolder(outDir, options);
  const target = resolve(outDir);
  const parent = dirname(target);
  try {
    await mkdir(parent, { recursive: true });
  } catch (e) {
    refuse(outDir, `cannot create ${parent}: ${reason(e)}`);
  }
  const tmp = tempName(target, 'tmp');
  const forgetTmp = undoOnInterrupt(() => rmSync(tmp, { recursive: true, force: true }));
  let old: string | null = null;
  let forgetOld = (): void => {};
  try {
    try {
      await mkdir(tmp);
      // the marker first: a temporary folder holding it is recognisably this tool's
      await writeFile(
        join(tmp, REPORT_MARKER),
        JSON.stringify({ writtenBy: 'stopspan', version, files: files.map(([n]) => n) }, null, 2) + '\n',
        'utf8',
      );
      for (const [name, content] of files) {
        const body = typeof content === 'function' ? content() : content;
        if (typeof body === 'string') await writeFile(join(tmp, name), body, 'utf8');
        else await body.writeTo(join(tmp, name));
      }
    } catch (e) {
      if (e instanceof StopspanError || !errno(e)) throw e;
      refuse(outDir, reason(e));
    }
    if ((await lstatOrNull(target)) !== null) {
      await checkOutFolder(outDir, options); // it appeared, or changed, while this run was writing
      const moved = tempName(target, 'old');
      forgetOld = undoOnInterrupt(() => {
        if (!exists(target)) renameSync(moved, target);
        else rmSync(moved, { recursive: true, force: true });
      });
      await rename(target, moved);
      old = moved;
    }
    await rename(tmp, target);
  } catch (e) {
    await rm(tmp, { recursive: true, force: true });
    if (old !== null && (await lstatOrNull(target)) === null) await rename(old, target); // put the previous folder back
    forgetOld();
    forgetTmp();
    throw e;
  }
  forgetTmp();
  if (old !== null) await rm(old, { recursive: true, force: true });
  forgetOld();
  return files.map(([n]) => join(target, n));
}

function exists(path: string): boolean {
  try {
    lstatSync(path);
    return true;
  } catch {
    return false;
  }
}
