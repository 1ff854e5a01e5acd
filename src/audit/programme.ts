// Candidates as a consistent programme. Each generated candidate is weighed alone; listed together those
// figures do not add up (two neighbours each worth removing may be worth little together). This takes the
// generated list and builds the ranked list greedily: accept the candidate that saves riders most given
// those already accepted, re-weigh every candidate touching a pattern it changed, and repeat while one
// still saves riders time. Each listed figure is then the marginal effect given those ranked above it, so
// any prefix of the list adds up and equals whatif of the same set (the same corridor cost, pattern by
// pattern, through the what-if engine). Applied after the candidates are generated, whatever made them.

import type { Feed } from '../gtfs/types.js';
import type { ModelParams } from '../model/params.js';
import type { PreparedPattern } from '../model/preparePattern.js';
import type { Candidate } from './types.js';
import { costSettings } from '../model/preparePattern.js';
import type { CostSettings } from '../model/corridor.js';
import {
  effectTerms,
  reachAround,
  reachOf,
  resolveChanges,
  servedAfter,
  touchedSpan,
  type Window,
  type EffectTerms,
  type PatternEdit,
  type ScenarioInput,
  type ScenarioPatternEffect,
} from '../model/scenario.js';

/** The scenario item of one candidate: a removal on its patterns, or an addition on its patterns. */
export function candidateScenario(c: Candidate): ScenarioInput {
  return c.action === 'remove'
    ? { remove: [{ stop: c.stopId, patterns: [...c.patternIds] }] }
    : { add: [{ lat: c.lat, lon: c.lon, patterns: [...c.patternIds] }] };
}

/** The scenario of a set of candidates (e.g. a prefix of the programme), for whatif. */
export function programmeScenario(list: Candidate[]): ScenarioInput {
  const out: ScenarioInput = {};
  for (const c of list) {
    const s = candidateScenario(c);
    if (s.remove) (out.remove ??= []).push(...s.remove);
    if (s.add) (out.add ??= []).push(...s.add);
  }
  return out;
}

function merged(a: PatternEdit | undefined, b: PatternEdit): PatternEdit {
  if (!a) return b;
  return {
    prep: a.prep,
    removed: new Set([...a.removed, ...b.removed]),
    moved: new Map([...a.moved, ...b.moved]),
    added: [...a.added, ...b.added],
  };
}

type Figures = Pick<
  ScenarioPatternEffect,
  'netPaxMinPerDay' | 'ridersAffectedPerDay' | 'walkAddedPaxMinPerDay' | 'rideSavedPaxMinPerDay' | 'vehicleHoursPerDay' | 'tripsPerDay'
> & { busSPerDay: number };

const ZERO: Figures = {
  netPaxMinPerDay: 0,
  ridersAffectedPerDay: 0,
  walkAddedPaxMinPerDay: 0,
  rideSavedPaxMinPerDay: 0,
  vehicleHoursPerDay: 0,
  tripsPerDay: 0,
  busSPerDay: 0,
};

/** As the candidate columns count them: walk added net of walk saved, ride saved net of neighbours' extra stopping. */
function figuresOf(t: EffectTerms, s: CostSettings, tripsPerDay: number): Figures {
  const wv = s.walkWeight / s.walkSpeedMps;
  const walkAdded = (wv * t.walkAddedM) / 60;
  const walkSaved = (wv * t.walkSavedM) / 60;
  const rideSaved = t.rideSavedS / 60;
  const neighbours = t.neighboursS / 60;
  return {
    netPaxMinPerDay: walkAdded - walkSaved - rideSaved + neighbours,
    ridersAffectedPerDay: t.affected,
    walkAddedPaxMinPerDay: walkAdded - walkSaved,
    rideSavedPaxMinPerDay: rideSaved - neighbours,
    vehicleHoursPerDay: (t.busSavedS * tripsPerDay) / 3600,
    tripsPerDay,
    busSPerDay: t.busSavedS * tripsPerDay,
  };
}

/**
 * Work the programme may take, in stop-weighings: each acceptance re-weighs every candidate on the
 * patterns it changed, each weighing walks the pattern's stops. About a second of CPU; Manhattan's audit
 * needs under a hundredth of it. Above it (thousands of candidates on one pattern) the list is left as
 * generated, each candidate weighed alone, and the caller says so.
 */
export const PROGRAMME_WORK_LIMIT = 3e7;

/** The programme's work estimate: per pattern, (candidates on it)^2 x its stops. */
export function programmeWork(preps: PreparedPattern[], candidates: Candidate[]): number {
  const k = new Map<string, number>();
  for (const c of candidates) for (const p of c.patternIds) k.set(p, (k.get(p) ?? 0) + 1);
  let work = 0;
  for (const p of preps) {
    const n = k.get(p.pattern.id) ?? 0;
    work += n * n * p.modelStops.length;
  }
  return work;
}

/**
 * The programme: candidates in the order accepted, each with its marginal figures given those above it;
 * those that no longer save riders time once the others are in are left out. `robust` is judged after,
 * on this list as accepted (judgeRobust in sensitivity.ts).
 */
export function programmeCandidates(
  feed: Feed,
  date: string,
  preps: PreparedPattern[],
  params: ModelParams,
  candidates: Candidate[],
): Candidate[] {
  const w = params.walk_weight;
  // each candidate's own edits, by pattern
  const edits = candidates.map((c) => {
    try {
      return resolveChanges(feed, date, preps, candidateScenario(c));
    } catch {
      return null; // a candidate the engine cannot place (none expected): left out of the programme
    }
  });
  const current = new Map<string, PatternEdit>(); // accepted edits per pattern
  const servedNow = new Map<string, number[]>(); // the positions they leave served, per pattern
  const settingsOf = new Map<string, CostSettings>();
  const marginal: (Figures | null)[] = candidates.map(() => null); // null: to be (re)computed
  // per candidate and pattern, the stretch its marginal figures depend on: the stops and tiles it was
  // summed over and the two stops served either side of them. An accepted edit touching nothing in it
  // leaves the figures as they are (every term they sum sees the same stops), so they are not re-weighed.
  const dependsOn: Map<string, Window>[] = candidates.map(() => new Map());
  const perPattern = new Map<string, number[]>(); // pattern -> candidates touching it
  edits.forEach((m, i) => m?.forEach((_, pid) => perPattern.set(pid, [...(perPattern.get(pid) ?? []), i])));
  const open = new Set(edits.flatMap((m, i) => (m ? [i] : [])));
  const out: Candidate[] = [];
  // A candidate's marginal effect on a pattern: the accepted edits with it against those without it. The
  // two differ only within the candidate's reach among the stops the accepted edits leave served, so both
  // are summed over that stretch alone; every term outside it is the same in both and cancels exactly.
  const weigh = (i: number): Figures => {
    const f = { ...ZERO };
    for (const [pid, edit] of edits[i]!) {
      const base = current.get(pid);
      let settings = settingsOf.get(pid);
      if (!settings) settingsOf.set(pid, (settings = costSettings(edit.prep, params, { walkWeight: w })));
      const window = base ? reachOf(edit, servedNow.get(pid)!) : reachOf(edit);
      const trips = edit.prep.pattern.tripsPerDay;
      const terms = effectTerms(merged(base, edit), settings, window);
      dependsOn[i].set(pid, reachAround(servedNow.get(pid) ?? edit.prep.posM, terms.spanLoM, terms.spanHiM));
      const after = figuresOf(terms, settings, trips);
      const before = base ? figuresOf(effectTerms(base, settings, window), settings, trips) : ZERO;
      for (const k of Object.keys(f) as (keyof Figures)[]) if (k !== 'tripsPerDay') f[k] += after[k] - before[k];
      f.tripsPerDay += after.tripsPerDay;
    }
    return f;
  };
  for (;;) {
    let best = -1;
    let bestNet = 0;
    for (const i of open) {
      const f = (marginal[i] ??= weigh(i));
      if (f.netPaxMinPerDay < bestNet - 1e-9 || (best >= 0 && Math.abs(f.netPaxMinPerDay - bestNet) <= 1e-9 && i < best)) {
        best = i;
        bestNet = f.netPaxMinPerDay;
      }
    }
    if (best < 0) break;
    const f = marginal[best]!;
    open.delete(best);
    for (const [pid, edit] of edits[best]!) {
      const next = merged(current.get(pid), edit);
      const touched = touchedSpan(edit);
      current.set(pid, next);
      servedNow.set(pid, servedAfter(next));
      for (const j of perPattern.get(pid) ?? []) {
        const d = dependsOn[j].get(pid);
        if (!d || (touched.loM <= d.hiM && touched.hiM >= d.loM)) marginal[j] = null; // within its reach: re-weigh
      }
    }
    const c = candidates[best];
    out.push({
      ...c,
      rank: out.length + 1,
      netPaxMinPerDay: f.netPaxMinPerDay,
      ridersAffectedPerDay: f.ridersAffectedPerDay,
      walkAddedPaxMinPerDay: f.walkAddedPaxMinPerDay,
      rideSavedPaxMinPerDay: f.rideSavedPaxMinPerDay,
      runTimeSavedPerTripS: f.tripsPerDay > 0 ? f.busSPerDay / f.tripsPerDay : 0,
      vehicleHoursPerDay: f.vehicleHoursPerDay,
    });
  }
  return out;
}
