// The audit stage: re-exports only.
export type * from './types.js';
export * from './verdicts.js';
export * from './candidates.js';
export * from './sensitivity.js';
export * from './runAudit.js';
export * from './prepareAudit.js';
export * from './cautions.js';
export * from './verdictKinds.js';
