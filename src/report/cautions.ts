// The cautions every report and every command that proposes changes must show, as one constant, so the
// HTML page, summary.json and the CLI print the same words.

export const CAUTIONS: readonly string[] = [
  'This is a screening tool: its figures show where a closer look may pay off; they decide nothing.',
  'Before any stop is removed or moved: a field review of the walk (crossings, sidewalks, grades, lighting);',
  'an accessibility review under local law (for example the ADA in the US);',
  'attention to older and disabled riders, for whom a longer walk weighs more;',
  'an equity review where one is required (for example Title VI service-equity analysis in the US);',
  'and public engagement with the riders and neighbours affected.',
  'Local policy and licensed professional judgement decide.',
  'Every figure computed from assumed demand is labelled as assumed.',
];

/** The cautions as one paragraph, for plain-text output (the list items read on as one sentence). */
export const CAUTIONS_TEXT: string = CAUTIONS.join(' ');
