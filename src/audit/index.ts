// The audit stage: re-exports only.
export type * from './types.js';
export * from './verdicts.js';
export * from './candidates.js';
export * from './sensitivity.js';
export * from './runAudit.js';
export * from './prepareAudit.js';
export * from './whatif.js';
export * from './cautions.js';
export * from './findings.js';
export * from './check.js';
export * from './checkText.js';
export * from './compare.js';
export * from './compareRender.js';
