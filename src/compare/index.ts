// Comparison of two versions of a feed (stops, patterns, spacing and trips): re-exports only.
export * from './compare.js';
