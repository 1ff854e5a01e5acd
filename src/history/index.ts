// The history of runs: open, record, read (its table and page are rendered in src/report).
export { openHistory, MIGRATIONS, SCHEMA_VERSION, type HistoryDb, type OpenHistoryOptions } from './openHistory.js';
export { recordRun, type RunRow, type RunHeadline } from './recordRun.js';
export { readHistory, feedKey, ranChecks, type RunRecord, type ReadHistoryOptions } from './readHistory.js';
export { checkRunRow, auditRunRow } from './runRows.js';
