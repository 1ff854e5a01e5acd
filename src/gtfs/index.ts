// The feed reader's public API: re-exports only.
export { CsvCore, CsvRow, DEFAULT_MAX_RECORD_CHARS, MAX_FIELD_CHARS, looksUtf16, type CsvStats } from './csvCore.js';
export * from './csv.js';
export * from './values.js';
export * from './archive.js';
export * from './download.js';
export * from './calendar.js';
export * from './frequencies.js';
export * from './readFeed.js';
export * from './stopTimesStore.js';
