// Progress reporting: stages call an optional callback; only the CLI draws it (stderr, TTY only).

export interface ProgressEvent {
  stage: string; // e.g. 'read stop_times.txt', 'patterns', 'model', 'report'
  done?: number; // units done so far (rows, bytes, patterns)
  total?: number; // total units when known
  unit?: string; // 'rows', 'bytes', 'patterns'
}

export type OnProgress = (event: ProgressEvent) => void;
