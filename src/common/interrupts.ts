// What this run has started on disk and must undo if it is interrupted: the temporary folder of a report
// being written, a report moved aside while its replacement is renamed in, a download in progress. The
// library only registers and unregisters synchronous undo steps here; the CLI decides what a signal does
// (it runs them and exits 130 or 143). A step must be safe to run at any moment of the work it guards.

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
