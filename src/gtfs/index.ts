// The feed reader's public API: re-exports only.
export * from './csv.js';
