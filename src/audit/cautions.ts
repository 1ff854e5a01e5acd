// The cautions shown with every audit and every what-if (design notes, section 9).
export const CAUTIONS: readonly string[] = Object.freeze([
  'This is a screening tool. Before any stop is removed or moved: field review of the walk (crossings, sidewalks, grades, lighting), accessibility review under local law (for example the ADA in the US), attention to older and disabled riders, an equity review where one is required (for example Title VI service-equity analysis in the US), and public engagement. Local policy and licensed professional judgement decide.',
]);
