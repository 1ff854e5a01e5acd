// The model stage: re-exports only.
export type * from './types.js';
export * from './params.js';
export * from './lostTime.js';
export * from './stopping.js';
export * from './sqrtLaw.js';
export * from './band.js';
export * from './localOptimum.js';
export * from './cruiseSpeed.js';
export * from './ridership.js';
export * from './demand.js';
export * from './corridor.js';
export * from './optimiser.js';
export * from './effectiveOptimum.js';
export * from './preparePattern.js';
export * from './walkReach.js';
export * from './catchments.js';
