// The land-use reader on a worker thread (started by readLandUseAside.ts): reads the layer named in
// workerData and posts it back, its typed arrays transferred, or the StopspanError it threw as plain fields.
// A module with a side effect on purpose: it is run as a worker's entry, never imported.

import { parentPort, workerData } from 'node:worker_threads';
import { isStopspanError } from '../common/errors.js';
import { readLandUse, type LandUseColumn } from './readLandUse.js';

const { file, columns } = workerData as { file: string; columns: LandUseColumn[] | null };
try {
  const layer = readLandUse(file, { columns });
  const buffers = [layer.featureRef, layer.lat, layer.lon, layer.featureOf, layer.people, ...layer.amounts].map(
    (a) => a.buffer as ArrayBuffer,
  );
  parentPort!.postMessage({ layer }, buffers);
} catch (e) {
  if (isStopspanError(e)) parentPort!.postMessage({ error: { code: e.code, message: e.message, context: e.context } });
  else parentPort!.postMessage({ bug: e instanceof Error ? (e.stack ?? e.message) : String(e) });
}
