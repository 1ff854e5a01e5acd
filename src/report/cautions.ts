// The cautions shown on every report: re-exported from their one source, src/audit/cautions.ts, so the
// audit result, the what-if result, the pages, summary.json and the CLI cannot drift apart.

export { CAUTIONS, CAUTIONS_TEXT } from '../audit/cautions.js';
