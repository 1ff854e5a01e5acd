// The stopspan library: re-exports each stage's public API.
export * from './common/errors.js';
export type * from './common/progress.js';
export * from './common/warnings.js';
export type * from './gtfs/types.js';
export type * from './network/types.js';
export type * from './audit/types.js';
export type * from './realtime/types.js';
export { version } from './version.js';
