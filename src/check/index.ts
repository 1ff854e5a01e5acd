// Feed checks for nightly jobs (findings with severities and thresholds): re-exports only.
export * from './findings.js';
export * from './check.js';
