// The cautions every report and every command that proposes changes must show, as one constant, so the
// HTML page, summary.json and the CLI print the same words.

export const CAUTIONS: readonly string[] = [
  'This is a screening tool. Its figures point to where a closer look may pay off; they are not a decision.',
  'Before any stop is removed or moved: field review of the walk (crossings, sidewalks, grades, lighting).',
  'Accessibility review under local law (for example the ADA in the US).',
  'Attention to older and disabled riders, for whom a longer walk weighs more.',
  'An equity review where one is required (for example Title VI service-equity analysis in the US).',
  'Public engagement with the riders and neighbours affected.',
  'Local policy and licensed professional judgement decide.',
  'Every figure computed from assumed demand is labelled as assumed.',
];

/** The cautions as one paragraph, for plain-text output. */
export const CAUTIONS_TEXT: string = CAUTIONS.join(' ');
