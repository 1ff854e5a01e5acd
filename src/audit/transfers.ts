// Which shared stops are transfer points and which are trunk stops. A stop served by patterns of several
// routes is a trunk stop where the routes run together through it: for every pair of them, the stop
// before it on one is also a stop before it on the other (within TRUNK_WINDOW stops, so a limited-stop
// route running along a local counts), and likewise the stop after it. A trunk stop's removal is one
// decision weighed over every pattern serving it (candidates.ts). Where two routes meet and part (one side
// shared, the other not: they join or leave each other there) or cross (neither side shared), the stop is
// a transfer point and is kept, with a note naming the routes. Patterns of one route_id never make a
// transfer between themselves: a local and its limited variant run together by design. (Design choices of
// this tool [D]: "run together" is read from stop ids shared in order, not from street geometry, and the
// window is a documented default.)

import type { Feed } from '../gtfs/types.js';
import type { Pattern, PatternSet } from '../network/types.js';

/** How many stops before (after) a stop on one pattern are searched for the other's neighbour. */
export const TRUNK_WINDOW = 15;

/** Why a shared stop is kept: the routes that cross, meet or part there, in words. */
export type TransferNotes = Map<number, string>;

interface At {
  p: Pattern;
  j: number; // position among the pattern's passenger stops
  ids: number[]; // the pattern's passenger stops, in order
}

/** Is stop `s` among `a`'s passenger stops strictly before (dir -1) or after (dir +1) position j, within the window? */
function within(a: At, s: number, dir: -1 | 1): boolean {
  for (let k = 1; k <= TRUNK_WINDOW; k++) {
    const i = a.j + dir * k;
    if (i < 0 || i >= a.ids.length) return false;
    if (a.ids[i] === s) return true;
  }
  return false;
}

/** How two patterns of different routes pass a stop both serve: together, meet (join), part (leave) or cross. */
export function howTheyPass(a: At, b: At): 'together' | 'meet' | 'part' | 'cross' {
  const prevA = a.j > 0 ? a.ids[a.j - 1] : -1;
  const nextA = a.j + 1 < a.ids.length ? a.ids[a.j + 1] : -1;
  const prevB = b.j > 0 ? b.ids[b.j - 1] : -1;
  const nextB = b.j + 1 < b.ids.length ? b.ids[b.j + 1] : -1;
  // same way: b's stop before is before on a (or a's before is before on b); after likewise
  const beforeSame = (prevB >= 0 && within(a, prevB, -1)) || (prevA >= 0 && within(b, prevA, -1));
  const afterSame = (nextB >= 0 && within(a, nextB, 1)) || (nextA >= 0 && within(b, nextA, 1));
  // opposite ways along the same street: b's stop before is after on a, b's stop after is before on a
  const beforeOpp = (prevB >= 0 && within(a, prevB, 1)) || (nextA >= 0 && within(b, nextA, -1));
  const afterOpp = (nextB >= 0 && within(a, nextB, -1)) || (prevA >= 0 && within(b, prevA, 1));
  if ((beforeSame && afterSame) || (beforeOpp && afterOpp)) return 'together';
  if (afterSame || afterOpp) return 'meet';
  if (beforeSame || beforeOpp) return 'part';
  return 'cross';
}

/**
 * The transfer points of a network, each with a note ("routes 1 and 2 part here"): stops where patterns
 * of different routes do not run together. Stops all of whose routes run together are trunk stops and are
 * not in the map.
 */
export function transferPoints(feed: Feed, patternSet: PatternSet): TransferNotes {
  const at = new Map<number, At[]>();
  for (const p of patternSet.patterns) {
    const ids: number[] = [];
    for (let j = 0; j < p.stopIdx.length; j++) if (p.passengerStop[j] !== false) ids.push(p.stopIdx[j]);
    const seen = new Set<number>();
    ids.forEach((s, j) => {
      if (seen.has(s)) return; // a loop calling twice: its first call stands for the stop
      seen.add(s);
      let list = at.get(s);
      if (!list) at.set(s, (list = []));
      list.push({ p, j, ids });
    });
  }
  const name = (routeId: string) => feed.routes.get(routeId)?.shortName || routeId;
  const notes: TransferNotes = new Map();
  for (const [s, list] of at) {
    if (list.length < 2) continue;
    const routes = new Set(list.map((x) => x.p.routeId));
    if (routes.size < 2) continue;
    found: for (let x = 0; x < list.length; x++) {
      for (let y = x + 1; y < list.length; y++) {
        const a = list[x];
        const b = list[y];
        if (a.p.routeId === b.p.routeId) continue;
        const how = howTheyPass(a, b);
        if (how === 'together') continue;
        const [r1, r2] = [name(a.p.routeId), name(b.p.routeId)].sort();
        notes.set(s, `routes ${r1} and ${r2} ${how === 'cross' ? 'cross' : how === 'meet' ? 'meet' : 'part'} here`);
        break found;
      }
    }
  }
  return notes;
}
