// The verdicts a stop can get, as one table: the letter the page's data uses, the legend the page shows
// beside each marker, and the meaning the README gives. The page and the README are drawn from (or tested
// against) this table, so a verdict cannot mean one thing on the page and another in the README.

import type { Verdict } from './types.js';

export interface VerdictKind {
  letter: 'C' | 'W' | 'O' | 'F'; // the verdict in the page's compact data
  legend: string; // beside the marker on the page's strip diagrams and maps
  meaning: string; // what the verdict says, in the README's words
}

export const VERDICTS: Record<Verdict, VerdictKind> = {
  close: { letter: 'C', legend: 'close stop (below the band): triangle', meaning: 'its spacing is below the band and removing it saves riders time' },
  wide: { letter: 'W', legend: 'next to a wide gap: diamond', meaning: 'its spacing is above the band' },
  ok: { letter: 'O', legend: 'within the band: open circle', meaning: 'its spacing is within the band' },
  fixed: { letter: 'F', legend: 'fixed (terminal, timepoint, transfer point, station nearby or kept): square', meaning: 'terminal, timepoint, transfer point, station nearby or kept' },
};
