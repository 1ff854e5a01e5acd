// The cautions every audit, every what-if and every report must show (design notes, section 9), as the
// one source: the HTML pages, summary.json and the CLI print the same words. src/report/cautions.ts
// re-exports these.

export const CAUTIONS: readonly string[] = Object.freeze([
  'This is a screening tool: its figures show where a closer look may pay off; they decide nothing.',
  'Before any stop is removed or moved: a field review of the walk (crossings, sidewalks, grades, lighting);',
  'an accessibility review under local law (for example the ADA in the US);',
  'attention to older and disabled riders, for whom a longer walk weighs more;',
  'an equity review where one is required (for example Title VI service-equity analysis in the US);',
  'and public engagement with the riders and neighbours affected.',
  'Before any stop is added: a site check that a bus can pull in and stop there safely, and that people can reach it on foot.',
  'Local policy and licensed professional judgement decide.',
  'Every figure computed from assumed demand is labelled as assumed.',
]);

/** The cautions as one paragraph, for plain-text output (the list items read on as one sentence). */
export const CAUTIONS_TEXT: string = CAUTIONS.join(' ');
