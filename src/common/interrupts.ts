// What this run has started on disk and must undo if it is interrupted: the temporary folder of a report
// being written, a report moved aside while its replacement is renamed in, a download in progress. The
// library only registers and unregisters synchronous undo steps here; the CLI decides what a signal does
// (it runs them and exits 130 or 143). A step must be safe to run at any moment of the work it guards.

import { readdir } from 'node:fs/promises';
import { join } from 'node:path';

type Undo = () => void;

const pending = new Set<Undo>();
let watcher: ((count: number) => void) | undefined;

/** Registers undo (synchronous) until the returned function is called; that call drops it without running it. */
export function undoOnInterrupt(undo: Undo): () => void {
  pending.add(undo);
  watcher?.(pending.size);
  return () => {
    if (pending.delete(undo)) watcher?.(pending.size);
  };
}

/** Runs every registered undo step, newest first, each at most once; a failing step does not stop the others. */
export function runInterruptUndo(): void {
  const steps = [...pending].reverse();
  pending.clear();
  for (const step of steps) {
    try {
      step();
    } catch {
      // best effort: the next run's sweep removes what is left
    }
  }
}

/** Tells f how many undo steps are registered, now and whenever the number changes (one watcher: the CLI's). */
export function watchInterruptUndo(f: ((count: number) => void) | undefined): void {
  watcher = f;
  f?.(pending.size);
}

/** Whether process pid is still running (this one, or one of another user): a temporary folder named with
 * a live pid belongs to a run in progress and is never swept. */
export function pidAlive(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * The folders in parent that a run of this tool left behind and that are safe to sweep: named as nameRe
 * matches (the run's pid in capture group pidGroup), that run no longer alive, and holding nothing but
 * plain files that fileOk accepts. Never throws: a parent or folder it cannot read gives nothing.
 */
export async function staleRunFolders(
  parent: string,
  nameRe: RegExp,
  pidGroup: number,
  fileOk: (name: string) => boolean = () => true,
): Promise<{ path: string; match: RegExpExecArray }[]> {
  const out: { path: string; match: RegExpExecArray }[] = [];
  let entries;
  try {
    entries = await readdir(parent, { withFileTypes: true });
  } catch {
    return out;
  }
  for (const entry of entries) {
    const match = nameRe.exec(entry.name);
    if (!match || !entry.isDirectory() || pidAlive(Number(match[pidGroup]))) continue;
    const path = join(parent, entry.name);
    try {
      const inside = await readdir(path, { withFileTypes: true });
      if (inside.every((f) => f.isFile() && fileOk(f.name))) out.push({ path, match });
    } catch {
      // gone already, or not ours to read
    }
  }
  return out;
}
