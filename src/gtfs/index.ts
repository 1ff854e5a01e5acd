// The feed reader's public API: re-exports only.
export * from './csv.js';
export * from './values.js';
export * from './archive.js';
export * from './download.js';
export * from './calendar.js';
export * from './frequencies.js';
export * from './readFeed.js';
export * from './stopTimesStore.js';
