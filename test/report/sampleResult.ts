// A realistic AuditResult for the report tests, set in the invented city of Vellmoor: a few patterns,
// stops with every verdict, wide gaps, candidates, sensitivity and warnings, with feed text that holds
// markup, quotes and spreadsheet formulas so escaping and guarding can be checked. makeSampleResult can
// also build a large network (hundreds of patterns) for the size checks. Deterministic: no randomness.

import type { AuditResult, Candidate, CostCurvePoint, GapResult, PatternResult, StopResult, Verdict } from '../../src/audit/types.js';
import type { FixedReason } from '../../src/model/types.js';

export const HOSTILE_NAMES = {
  img: '<img src=x onerror=alert(1)>',
  script: '</script><script>alert(2)</script>',
  quotes: `O'Brien "Quay" & Sons`,
  formula: '=HYPERLINK("http://x")',
  minus: '-Westbank Steps',
  multiline: 'Tannery\nYard',
  comma: 'Market, North Side',
  unicode: 'Brückenplatz Café',
} as const;

const PLAIN_NAMES = [
  'Vellmoor Central',
  'Harbour Gate',
  'Mill Lane',
  'Ropewalk',
  'Saltmarsh Road',
  'Kiln Street',
  'Old Weir',
  'Chapel Row',
  'Fenwick Park',
  'Lantern Square',
  'Copperfield',
  'Riverside Baths',
  'Hollins Cross',
  'Tollbar',
  'Beacon Hill',
  'Orchard Way',
  'Foundry Works',
  'Stonebridge',
  'Greyfriars',
  'Wool Exchange',
  'Tidewater',
  'Moorside',
  'Cinder Path',
  'Hawthorn Close',
  'Glassworks',
  'Netherby',
  'Ferry Landing',
  'Dyers Green',
];

/** Uniform-demand cost per rider, seconds: walk s/2 in total at weight w and speed v, plus p*L/s on board. */
export function costPerRiderS(spacingM: number, v: number, w: number, p: number, lM: number): number {
  return (w * (spacingM / 2)) / v + (p * lM) / spacingM;
}

interface PatternSpec {
  routeId: string;
  routeShortName: string;
  directionId: number;
  headsign: string;
  gapsM: number[];
  tripsPerDay: number;
  originLon: number;
  originLat: number;
  bearingRad: number;
  names: string[];
}

const V = 1.3; // walk speed, m/s (common practice)
const W = 2; // walk weight (common practice)
const P = 30; // lost time per stop, s

function buildPattern(spec: PatternSpec, n: number): { pattern: PatternResult; stops: StopResult[]; gaps: GapResult[] } {
  const patternId = `${spec.routeId}:${spec.directionId}:${n}`;
  const dist: number[] = [0];
  for (const g of spec.gapsM) dist.push(dist[dist.length - 1] + g);
  const lengthM = dist[dist.length - 1];
  const meanTripLengthM = lengthM / 3;
  const optimal = Math.sqrt((2 * V * P * meanTripLengthM) / W);
  const bandLowM = optimal * 0.729;
  const bandHighM = optimal * 1.372;
  const mPerDegLat = 111_320;
  const mPerDegLon = 111_320 * Math.cos((spec.originLat * Math.PI) / 180);
  const at = (d: number): [number, number] => {
    const wiggle = 60 * Math.sin(d / 700); // a gently curving street
    const east = d * Math.cos(spec.bearingRad) - wiggle * Math.sin(spec.bearingRad);
    const north = d * Math.sin(spec.bearingRad) + wiggle * Math.cos(spec.bearingRad);
    return [spec.originLon + east / mPerDegLon, spec.originLat + north / mPerDegLat];
  };
  const path: [number, number][] = [];
  for (let d = 0; d < lengthM; d += 50) path.push(at(d));
  path.push(at(lengthM));

  const stops: StopResult[] = [];
  const gaps: GapResult[] = [];
  const count = dist.length;
  let ridersPerDay = 0;
  let closeStops = 0;
  let wideGaps = 0;
  for (let i = 0; i < count; i++) {
    const before = i > 0 ? spec.gapsM[i - 1] : null;
    const after = i < count - 1 ? spec.gapsM[i] : null;
    const timepoint = i % 6 === 0;
    const terminal = i === 0 || i === count - 1;
    let verdict: Verdict = 'ok';
    let fixedReason: FixedReason = '';
    if (terminal) {
      verdict = 'fixed';
      fixedReason = 'terminal';
    } else if (timepoint) {
      verdict = 'fixed';
      fixedReason = 'timepoint';
    } else if (before !== null && after !== null && (before + after) / 2 < bandLowM) verdict = 'close';
    else if ((before ?? 0) > bandHighM || (after ?? 0) > bandHighM) verdict = 'wide';
    if (verdict === 'close') closeStops++;
    const boardings = Math.round(spec.tripsPerDay * (0.3 + ((i * 37) % 11) / 12));
    const alightings = Math.round(spec.tripsPerDay * (0.3 + ((i * 53) % 13) / 14));
    ridersPerDay += boardings;
    const [lon, lat] = at(dist[i]);
    const removal =
      verdict === 'fixed' || before === null || after === null
        ? null
        : Math.round(
            (((W / V) * ((boardings + alightings) * ((before * after) / (before + after)))) / 60 - spec.tripsPerDay * 8 * (P / 60)) * 10,
          ) / 10;
    stops.push({
      patternId,
      routeId: spec.routeId,
      directionId: spec.directionId,
      stopIndex: i,
      stopId: `${spec.routeId.replace(/\W/g, '')}-${spec.directionId}-${String(i).padStart(3, '0')}`,
      stopName: spec.names[i % spec.names.length],
      stopLat: lat,
      stopLon: lon,
      distAlongM: dist[i],
      gapBeforeM: before,
      gapAfterM: after,
      tripsPerDay: spec.tripsPerDay,
      boardingsPerDay: boardings,
      alightingsPerDay: alightings,
      loadDepartingPerDay: boardings * 3,
      stopProbability: 0.4 + ((i * 7) % 6) / 10,
      localOptimalSpacingM: optimal * (0.8 + ((i * 3) % 5) / 10),
      verdict,
      stopVerdict: verdict === 'wide' ? 'ok' : verdict,
      gapBeforeVerdict: before === null ? null : before > bandHighM ? 'wide' : before < bandLowM ? 'short' : 'ok',
      gapAfterVerdict: after === null ? null : after > bandHighM ? 'wide' : after < bandLowM ? 'short' : 'ok',
      fixedReason,
      fixedNote: '',
      keptByOptimiser: verdict !== 'close',
      removalNetPaxMinPerDay: removal,
      removalRunTimeSavedS: removal === null ? null : 14.5,
      demandSource: 'assumed',
      timepoint: timepoint || terminal,
      offsetFromShapeM: 3.5,
    });
    if (after !== null) {
      const wide = after > bandHighM;
      if (wide) wideGaps++;
      const [lon2, lat2] = at(dist[i] + after / 2);
      gaps.push({
        patternId,
        fromStopIndex: i,
        fromStopId: '',
        toStopId: '',
        gapM: after,
        verdict: wide ? 'wide' : after < bandLowM ? 'short' : 'ok',
        wide,
        coveredByLocal: null,
        expressStretch: false,
        overMaxGap: after > 700,
        addNetPaxMinPerDay: wide ? -Math.round(after / 9) : null,
        addMidLat: wide ? lat2 : null,
        addMidLon: wide ? lon2 : null,
      });
    }
  }
  for (const g of gaps) {
    g.fromStopId = stops[g.fromStopIndex].stopId;
    g.toStopId = stops[g.fromStopIndex + 1].stopId;
  }
  const sorted = [...spec.gapsM].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  const medianGapM = sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
  const meanGapM = lengthM / spec.gapsM.length;
  const costCurve: CostCurvePoint[] = [];
  for (let s = 100; s <= 1200; s += 25) costCurve.push({ spacingM: s, costPerRiderS: costPerRiderS(s, V, W, P, meanTripLengthM) });
  const currentCost = costPerRiderS(meanGapM, V, W, P, meanTripLengthM);
  const optimalCost = costPerRiderS(optimal, V, W, P, meanTripLengthM);
  const pattern: PatternResult = {
    patternId,
    routeId: spec.routeId,
    routeShortName: spec.routeShortName,
    routeType: 3,
    directionId: spec.directionId,
    headsign: spec.headsign,
    shapeId: `shp-${spec.routeId}-${spec.directionId}`,
    distanceSource: 'shape_projection',
    stopCount: count,
    lengthM,
    tripsPerDay: spec.tripsPerDay,
    medianGapM,
    meanGapM,
    optimalSpacingM: optimal,
    bandLowM,
    bandHighM,
    closeStops,
    wideGaps,
    optimalStopCount: Math.max(2, Math.round(lengthM / optimal) + 1),
    // what the optimiser would win: the savings of removing close stops and filling wide gaps
    paxMinLostPerDay:
      stops.reduce(
        (a, s) => a + (s.verdict === 'close' && s.removalNetPaxMinPerDay !== null ? Math.max(0, -s.removalNetPaxMinPerDay) : 0),
        0,
      ) + gaps.reduce((a, g) => a + (g.addNetPaxMinPerDay !== null ? -g.addNetPaxMinPerDay : 0), 0),
    paxMinAdditionsPerDay: 40 * wideGaps,
    paxMinAtStakePerDay: 0, // set below: the two together
    demandSource: 'assumed',
    lostTimeSource: 'default',
    lostTimePerStopS: P,
    cruiseSpeedMps: 8.2,
    cruiseSpeedSource: 'estimated',
    trafficDelayS: 120,
    stoppingModel: 'poisson',
    meanTripLengthM,
    ridersPerDay,
    runTimeS: lengthM / 5.5,
    costCurve,
    currentCostPerRiderS: currentCost,
    optimalCostPerRiderS: optimalCost,
    path,
  };
  pattern.paxMinAtStakePerDay = pattern.paxMinLostPerDay + pattern.paxMinAdditionsPerDay;
  return { pattern, stops, gaps };
}

function gapsFor(k: number, count: number): number[] {
  // close clusters (90-150 m), ordinary gaps (200-310 m) and a few wide ones (640+ m)
  const out: number[] = [];
  for (let i = 0; i < count; i++) {
    const r = (i * 7 + k * 13) % 10;
    out.push(r < 5 ? 90 + ((i * 17 + k) % 60) : r < 9 ? 200 + ((i * 29 + k * 3) % 110) : 640 + ((i * 11 + k) % 180));
  }
  return out;
}

export interface SampleOptions {
  patterns?: number; // how many patterns; the first three are the hand-set Vellmoor ones
  stopsPerPattern?: number;
}

export function makeSampleResult(options: SampleOptions = {}): AuditResult {
  const { patterns: nPatterns = 3, stopsPerPattern = 18 } = options;
  const hostile = Object.values(HOSTILE_NAMES);
  const specs: PatternSpec[] = [
    {
      routeId: 'R1',
      routeShortName: '1',
      directionId: 0,
      headsign: 'Harbour Gate',
      gapsM: gapsFor(0, stopsPerPattern - 1),
      tripsPerDay: 96,
      originLon: 11.2,
      originLat: 48.5,
      bearingRad: 0.3,
      names: [
        PLAIN_NAMES[0],
        HOSTILE_NAMES.img,
        ...PLAIN_NAMES.slice(1, 4),
        ...hostile.filter((n) => n !== HOSTILE_NAMES.img),
        ...PLAIN_NAMES.slice(4),
      ],
    },
    {
      routeId: 'R1',
      routeShortName: '1',
      directionId: 1,
      headsign: 'Vellmoor Central',
      gapsM: gapsFor(1, stopsPerPattern - 2),
      tripsPerDay: 94,
      originLon: 11.26,
      originLat: 48.52,
      bearingRad: 0.3 + Math.PI,
      names: PLAIN_NAMES.slice(6),
    },
    {
      routeId: 'R7<b>',
      routeShortName: '7 <i>Express</i>',
      directionId: 0,
      headsign: `Moorside "via" Tollbar`,
      gapsM: gapsFor(2, stopsPerPattern + 4),
      tripsPerDay: 48,
      originLon: 11.18,
      originLat: 48.53,
      bearingRad: -0.9,
      names: [...PLAIN_NAMES.slice(10), HOSTILE_NAMES.img],
    },
  ];
  for (let k = specs.length; k < nPatterns; k++) {
    specs.push({
      routeId: `R${10 + (k >> 1)}`,
      routeShortName: String(10 + (k >> 1)),
      directionId: k % 2,
      headsign: PLAIN_NAMES[k % PLAIN_NAMES.length],
      gapsM: gapsFor(k, stopsPerPattern - 1 + (k % 5)),
      tripsPerDay: 20 + (k % 40),
      originLon: 11.1 + (k % 13) * 0.01,
      originLat: 48.45 + (k % 11) * 0.01,
      bearingRad: k * 0.7,
      names: PLAIN_NAMES.slice(k % 7),
    });
  }
  const built = specs.map((s, i) => buildPattern(s, i < 2 ? 1 : 1 + (i % 3)));
  // pattern ids must be unique even when generated
  built.forEach((b, i) => {
    if (i >= 3) {
      const id = `${b.pattern.routeId}:${b.pattern.directionId}:${i}`;
      b.pattern.patternId = id;
      for (const s of b.stops) s.patternId = id;
      for (const g of b.gaps) g.patternId = id;
    }
  });
  // give the markup-laden name to route 1's best removal, so it reaches the headline's top candidates
  const best = built[0].stops
    .filter((s) => s.verdict === 'close' && (s.removalNetPaxMinPerDay ?? 0) < 0)
    .sort((a, b) => (a.removalNetPaxMinPerDay as number) - (b.removalNetPaxMinPerDay as number))[0];
  const holder = built[0].stops.find((s) => s.stopName === HOSTILE_NAMES.img);
  if (best && holder) [best.stopName, holder.stopName] = [holder.stopName, best.stopName];
  const patterns = built.map((b) => b.pattern);
  const stops = built.flatMap((b) => b.stops);
  const gaps = built.flatMap((b) => b.gaps);

  const removals: Candidate[] = stops
    .filter((s) => s.verdict === 'close' && s.removalNetPaxMinPerDay !== null)
    .map((s) => ({
      rank: 0,
      action: 'remove' as const,
      stopId: s.stopId,
      stopName: s.stopName,
      lat: s.stopLat,
      lon: s.stopLon,
      routeIds: [s.routeId],
      patternIds: [s.patternId],
      netPaxMinPerDay: s.removalNetPaxMinPerDay as number,
      ridersAffectedPerDay: s.boardingsPerDay + s.alightingsPerDay,
      walkAddedPaxMinPerDay: Math.abs(s.removalNetPaxMinPerDay as number) * 0.6,
      rideSavedPaxMinPerDay: Math.abs(s.removalNetPaxMinPerDay as number) * 1.6,
      runTimeSavedPerTripS: 14.5,
      vehicleHoursPerDay: (14.5 * s.tripsPerDay) / 3600,
      robust: s.stopIndex % 3 !== 0,
      evidence: '',
      fromStopId: '',
      toStopId: '',
      gapM: null,
    }));
  const stopById = new Map(stops.map((s) => [s.stopId, s]));
  const additions: Candidate[] = gaps
    .filter((g) => g.wide && g.addNetPaxMinPerDay !== null)
    .map((g) => ({
      rank: 0,
      action: 'add' as const,
      stopId: '',
      stopName: `between ${stopById.get(g.fromStopId)?.stopName} and ${stopById.get(g.toStopId)?.stopName}`,
      lat: g.addMidLat as number,
      lon: g.addMidLon as number,
      routeIds: [stopById.get(g.fromStopId)?.routeId ?? ''],
      patternIds: [g.patternId],
      netPaxMinPerDay: g.addNetPaxMinPerDay as number,
      ridersAffectedPerDay: 140,
      walkAddedPaxMinPerDay: -Math.abs(g.addNetPaxMinPerDay as number) * 1.4,
      rideSavedPaxMinPerDay: -Math.abs(g.addNetPaxMinPerDay as number) * 0.4,
      runTimeSavedPerTripS: -16,
      vehicleHoursPerDay: -0.4,
      robust: true,
      evidence: '2 stops of route <b>&amp; within a walk of the site',
      fromStopId: g.fromStopId,
      toStopId: g.toStopId,
      gapM: g.gapM,
    }));
  const candidates = [...removals, ...additions]
    .filter((c) => c.netPaxMinPerDay < 0)
    .sort((a, b) => a.netPaxMinPerDay - b.netPaxMinPerDay || a.stopName.localeCompare(b.stopName));
  candidates.forEach((c, i) => (c.rank = i + 1));

  const allGaps = gaps.map((g) => g.gapM).sort((a, b) => a - b);
  const tripsTotal = patterns.reduce((a, p) => a + p.tripsPerDay, 0);
  return {
    tool: { name: 'stopspan', version: '0.1.0' },
    feed: {
      source: 'fixtures/demo/vellmoor-gtfs.zip',
      contentHash: 'sha256:3f9a0c7e',
      version: '2026-11 <draft>',
      publisher: 'Vellmoor Transit & "Ferries"',
    },
    date: '2026-11-18',
    generatedAt: '2026-12-01T22:00:00.000Z',
    demandSource: 'assumed',
    lostTimeSource: 'default',
    params: {
      walk_speed_mps: { value: V, source: 'M', note: 'typical adult walking speed, common practice' },
      walk_weight: { value: W, source: 'M', note: 'walk time weighed twice in-vehicle time, common practice' },
      door_time_s: { value: 4, source: 'M', note: 'door opening and closing, 2-5 s' },
      accel_mps2: { value: 1.22, source: 'S', note: '4.0 ft/s², HCM 2010 via secondary source' },
      decel_mps2: { value: 1.22, source: 'S', note: '4.0 ft/s², HCM 2010 via secondary source' },
      reentry_delay_s: { value: 2, source: 'D', note: 'assumption, documented' },
      cruise_speed_mps: { value: null, source: 'estimated', note: 'estimated per pattern from the schedule' },
      band_tolerance: { value: 0.05, source: 'D', note: 'within 5 % of the optimum cost' },
      stopping_model: { value: 'poisson', source: 'M', note: 'P = 1 - exp(-λ) <Poisson>' },
      assumed_boardings_per_trip_km: { value: 2.5, source: 'user', note: 'set in params.json' },
    },
    headline: {
      patterns: patterns.length,
      stops: stops.length,
      trips: Math.round(tripsTotal),
      medianGapM: allGaps[allGaps.length >> 1],
      meanOptimalSpacingM: patterns.reduce((a, p) => a + p.optimalSpacingM, 0) / patterns.length,
      closeStops: patterns.reduce((a, p) => a + p.closeStops, 0),
      // the sample's stop ids are per pattern, so no wide gap is shared and the two counts agree
      wideGaps: patterns.reduce((a, p) => a + p.wideGaps, 0),
      wideGapsOnPatterns: patterns.reduce((a, p) => a + p.wideGaps, 0),
      paxMinLostPerDay: patterns.reduce((a, p) => a + p.paxMinLostPerDay, 0),
      paxMinAdditionsPerDay: patterns.reduce((a, p) => a + p.paxMinAdditionsPerDay, 0),
      paxMinAtStakePerDay: patterns.reduce((a, p) => a + p.paxMinAtStakePerDay, 0),
    },
    patterns,
    stops,
    gaps,
    candidates,
    reviewGaps: [
      // the last wide gap, as if nobody were near its middle
      ...gaps
        .filter((g) => g.wide)
        .slice(-1)
        .map((g) => ({
          fromStopId: g.fromStopId,
          toStopId: g.toStopId,
          name: 'between <Quay> & "Bridge"',
          lat: 50.01,
          lon: 4.02,
          gapM: g.gapM,
          routeIds: [stopById.get(g.fromStopId)?.routeId ?? ''],
          patternIds: [g.patternId],
          reason: 'long-straight-empty' as const,
          detail: '1.6 km straight with no stop of another route within a 400 m walk of its middle',
        })),
    ],
    sensitivity: [
      {
        label: 'base',
        walkWeight: 2,
        bandTolerance: 0.05,
        meanOptimalSpacingM: 380,
        closeStops: 30,
        wideGaps: 12,
        paxMinLostPerDay: 5200,
        candidatesKept: 10,
        programmeNetPaxMinPerDay: -4100,
        programmeStillSaving: 12,
      },
      {
        label: 'walk_weight=1.5',
        walkWeight: 1.5,
        bandTolerance: 0.05,
        meanOptimalSpacingM: 439,
        closeStops: 38,
        wideGaps: 8,
        paxMinLostPerDay: 7100,
        candidatesKept: 10,
        programmeNetPaxMinPerDay: -5200,
        programmeStillSaving: 12,
      },
      {
        label: 'walk_weight=2.5',
        walkWeight: 2.5,
        bandTolerance: 0.05,
        meanOptimalSpacingM: 340,
        closeStops: 24,
        wideGaps: 15,
        paxMinLostPerDay: 3900,
        candidatesKept: 8,
        programmeNetPaxMinPerDay: -3100,
        programmeStillSaving: 10,
      },
      {
        label: 'band_tolerance=0.10',
        walkWeight: 2,
        bandTolerance: 0.1,
        meanOptimalSpacingM: 380,
        closeStops: 19,
        wideGaps: 7,
        paxMinLostPerDay: 5200,
        candidatesKept: 9,
        programmeNetPaxMinPerDay: -4100,
        programmeStillSaving: 12,
      },
    ],
    warnings: [
      {
        code: 'padded-values',
        message: 'values padded with spaces were trimmed',
        count: 3648,
        examples: ['stops.txt:2 column stop_lat', 'stops.txt:3 column stop_lon'],
      },
      {
        code: 'trip-without-shape',
        message: 'trips without a shape <img src=x onerror=alert(3)> used straight lines',
        count: 2,
        examples: ['trip T-88', '=cmd|"/c calc"!A1'],
      },
    ],
    assumptions: [
      'Demand is assumed: 2.5 boardings per trip-km spread evenly along each pattern.',
      'Mean trip length is a third of the pattern length.',
      'Lost time per stop uses default door, braking and re-entry times.',
    ],
  };
}

/** A result with nothing in it (no patterns, stops, candidates or warnings): the reports must still render. */
export function makeEmptyResult(): AuditResult {
  const r = makeSampleResult();
  return {
    ...r,
    headline: {
      patterns: 0,
      stops: 0,
      trips: 0,
      medianGapM: 0,
      meanOptimalSpacingM: 0,
      closeStops: 0,
      wideGaps: 0,
      wideGapsOnPatterns: 0,
      paxMinLostPerDay: 0,
      paxMinAdditionsPerDay: 0,
      paxMinAtStakePerDay: 0,
    },
    patterns: [],
    stops: [],
    gaps: [],
    candidates: [],
    sensitivity: [],
    warnings: [],
    assumptions: [],
  };
}
