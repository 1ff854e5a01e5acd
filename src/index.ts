// The stopspan library: re-exports each stage's public API, in pipeline order.
export * from './common/errors.js';
export type * from './common/progress.js';
export * from './common/warnings.js';
export * from './common/warningCodes.js';
export * from './gtfs/index.js';
export * from './network/index.js';
export * from './model/index.js';
export * from './audit/index.js';
export { auditFeed, type AuditFeedOptions, type AuditFeedOutput } from './audit/auditFeed.js';
export * from './check/index.js';
export * from './compare/index.js';
export * from './whatif/index.js';
export * from './realtime/index.js';
export * from './landuse/index.js';
export * from './report/index.js';
export * from './history/index.js';
export { version } from './version.js';
