// The verdicts a stop can get, as one table: the letter the page's data uses, the legend the page shows
// beside each marker, and the meaning the README gives. The page and the README are drawn from (or tested
// against) this table, so a verdict cannot mean one thing on the page and another in the README.
// The stop's own verdict and each gap's verdict are two more tables below: `verdict` (stops.csv's first
// column of them) says "wide" of a stop beside a wide gap, a gap's label on a stop; stop_verdict and the
// gap verdicts keep the two apart.

import type { GapVerdict, StopOwnVerdict, Verdict } from './types.js';

export interface VerdictKind {
  letter: 'C' | 'W' | 'O' | 'F'; // the verdict in the page's compact data
  legend: string; // beside the marker on the page's strip diagrams and maps
  meaning: string; // what the verdict says, in the README's words
}

export const VERDICTS: Record<Verdict, VerdictKind> = {
  close: {
    letter: 'C',
    legend: 'close stop (below the band): triangle',
    meaning: 'its spacing is below the band and removing it saves riders time',
  },
  wide: { letter: 'W', legend: 'next to a wide gap: diamond', meaning: 'its spacing is above the band' },
  ok: { letter: 'O', legend: 'within the band: open circle', meaning: 'its spacing is within the band' },
  fixed: {
    letter: 'F',
    legend: 'fixed (terminal, timepoint, transfer point, station nearby or kept): square',
    meaning: 'terminal, timepoint, transfer point, station nearby or kept',
  },
};

/** A stop's own verdict (stops.csv stop_verdict): what the stop is, whatever the gaps beside it are. */
export const STOP_VERDICTS: Record<StopOwnVerdict, string> = {
  close: 'its spacing is below the band and removing it saves riders time',
  ok: 'a passenger stop neither close nor fixed; the gaps beside it have verdicts of their own',
  fixed: 'terminal, timepoint, transfer point, station nearby or kept',
  'timing-only':
    'a timing point where no one boards or alights, pickup_type=1 and drop_off_type=1: no stop for spacing, its gaps are measured past it',
};

/** A gap's verdict (stops.csv gap_before_verdict and gap_after_verdict): the gap between two passenger stops. */
export const GAP_VERDICTS: Record<GapVerdict, string> = {
  short: 'below the band',
  ok: 'within the band',
  wide: 'above the band, with no local serving it and no express stretch: the wide gaps the headline counts',
  local: 'above the band, but another route or pattern serves it as a local',
  express: 'above the band on an express stretch, left out of the verdicts',
};
