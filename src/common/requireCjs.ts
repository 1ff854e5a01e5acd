// CommonJS packages on the CLI's start-up path (commander, yauzl) are loaded with require, not import:
// through the ES module loader a CommonJS package is first scanned for its export names, which cost
// 30-50 ms of every start for those two (measured: 30-45 ms against 60-93 ms, 6 runs each).

import { createRequire } from 'node:module';

export const requireCjs = createRequire(import.meta.url);
