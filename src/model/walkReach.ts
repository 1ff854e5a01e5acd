// How far riders walk to a stop: one answer for the evidence rule for additions (src/audit/additionEvidence.ts)
// and for the land-use catchments and coverage (src/model/catchments.ts), so a "walk of a stop" means the
// same distance everywhere in the reports.
//   - 400 m walked [M, common practice: a quarter mile / 400 m is the usual bus-stop catchment];
//   - at a detour factor of 1.3 [M, common practice for street grids: network distance is about 1.2-1.4
//     times the straight line], so a straight line of about 308 m.

/** Walk distance a rider accepts to a stop, metres [M, common practice]. */
export const WALK_RADIUS_M = 400;
/** Walked distance over straight-line distance on a street grid [M, common practice]. */
export const WALK_DETOUR = 1.3;
/** The straight-line reach of a walk of WALK_RADIUS_M. */
export const WALK_REACH_M = WALK_RADIUS_M / WALK_DETOUR;
