// Proposed stop changes weighed on every pattern they touch: re-exports only.
export * from './whatif.js';
