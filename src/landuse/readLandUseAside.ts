// Reads a land-use layer on a worker thread while the caller goes on (reading the feed): a city's GeoJSON
// blocks take about as long to parse as a third of an audit, and the audit's main thread is busy while the
// feed is inflated on the thread pool, so the second core is half idle then. Errors come back as the same
// StopspanError. Where the worker's module is not beside this one (the sources run by the test runner), or
// a worker cannot start, the layer is read here, on the calling thread, as readLandUse does.

import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { StopspanError, type ErrorCode, type ErrorContext } from '../common/errors.js';
import { readLandUse, type LandUseColumn, type LandUseLayer } from './readLandUse.js';

/** The worker's compiled entry: dist/landuse/landUseWorker.js, seen from dist/landuse or from the command's chunks in dist/bin. */
function workerPath(): string | null {
  const here = dirname(fileURLToPath(import.meta.url));
  const path = join(here, '..', 'landuse', 'landUseWorker.js');
  return existsSync(path) ? path : null;
}

/** The layer, read on a worker thread when one can be started (see the file's head). */
export function readLandUseAside(file: string, { columns = null }: { columns?: LandUseColumn[] | null } = {}): Promise<LandUseLayer> {
  const path = workerPath();
  if (path === null) return Promise.resolve().then(() => readLandUse(file, { columns }));
  return new Promise<LandUseLayer>((resolve, reject) => {
    let worker: Worker;
    try {
      worker = new Worker(path, { workerData: { file, columns } });
    } catch {
      resolve(Promise.resolve().then(() => readLandUse(file, { columns })));
      return;
    }
    let settled = false;
    worker.once(
      'message',
      (m: { layer?: LandUseLayer; error?: { code: ErrorCode; message: string; context: ErrorContext }; bug?: string }) => {
        settled = true;
        if (m.layer) resolve(m.layer);
        else if (m.error) reject(new StopspanError(m.error.code, m.error.message, m.error.context));
        else reject(new Error(`land-use reader failed: ${m.bug}`));
        void worker.terminate();
      },
    );
    worker.once('error', (e) => {
      if (!settled) reject(e);
      settled = true;
    });
    worker.once('exit', (code) => {
      if (!settled) reject(new Error(`land-use reader stopped with exit code ${code}`));
      settled = true;
    });
  });
}
