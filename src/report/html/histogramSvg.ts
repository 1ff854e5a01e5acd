// The network-wide histogram of gaps between consecutive stops, as a static inline SVG, with the
// near-optimal band and the modelled optimum drawn on it so a planner sees how much of the network lies
// below or above the band. Each bar is split by the gaps' own verdicts (each against its pattern's band):
// the part below the band and the part judged wide, the very gaps the headline counts, so the chart and the
// card cannot disagree. Only numbers go into the markup, never feed text.

import type { GapVerdict } from '../../audit/types.js';
import { metresToFeet, type Units } from '../units.js';

export interface HistogramInput {
  gapsM: number[];
  /** Each gap's verdict, as gapsM (GapResult.verdict). */
  verdicts: GapVerdict[];
  bandLowM: number;
  bandHighM: number;
  optimalM: number;
  medianGapM: number;
}

const WIDTH = 760;
const HEIGHT = 260;
const PAD = { left: 52, right: 16, top: 28, bottom: 44 };

const f1 = (v: number): string => (Math.round(v * 10) / 10).toString();

export function histogramSvg(input: HistogramInput, units: Units): string {
  const { gapsM, verdicts, bandLowM, bandHighM, optimalM, medianGapM } = input;
  const binM = units === 'imperial' ? 200 * 0.3048 : 50; // 200 ft or 50 m bins
  const maxM = Math.max(binM * 4, Math.min(units === 'imperial' ? 6000 * 0.3048 : 1800, Math.max(bandHighM * 1.6, quantile(gapsM, 0.98))));
  const nBins = Math.ceil(maxM / binM);
  const counts = new Array<number>(nBins + 1).fill(0); // the last bin holds everything beyond maxM
  const shortCounts = new Array<number>(nBins + 1).fill(0);
  const wideCounts = new Array<number>(nBins + 1).fill(0);
  gapsM.forEach((g, k) => {
    if (!Number.isFinite(g)) return;
    const i = Math.min(nBins, Math.max(0, Math.floor(g / binM)));
    counts[i]++;
    if (verdicts[k] === 'short') shortCounts[i]++;
    else if (verdicts[k] === 'wide') wideCounts[i]++;
  });
  const top = Math.max(1, ...counts);
  const plotW = WIDTH - PAD.left - PAD.right;
  const plotH = HEIGHT - PAD.top - PAD.bottom;
  const xOf = (m: number): number => PAD.left + (Math.min(m, (nBins + 1) * binM) / ((nBins + 1) * binM)) * plotW;
  const yOf = (c: number): number => PAD.top + plotH - (c / top) * plotH;
  const label = (m: number): string => (units === 'imperial' ? `${Math.round(metresToFeet(m))} ft` : `${Math.round(m)} m`);
  const parts: string[] = [];
  parts.push(
    `<svg class="chart" viewBox="0 0 ${WIDTH} ${HEIGHT}" role="img" aria-labelledby="hist-title hist-desc" xmlns="http://www.w3.org/2000/svg">`,
    `<title id="hist-title">Gaps between consecutive stops across the network</title>`,
    `<desc id="hist-desc">${gapsM.length} gaps; median ${label(medianGapM)}; near-optimal band ${label(bandLowM)} to ${label(bandHighM)}; optimum ${label(optimalM)}.</desc>`,
  );
  if (bandHighM > bandLowM) {
    parts.push(
      `<rect class="band" x="${f1(xOf(bandLowM))}" y="${PAD.top}" width="${f1(xOf(bandHighM) - xOf(bandLowM))}" height="${plotH}"><title>near-optimal band ${label(bandLowM)} to ${label(bandHighM)}</title></rect>`,
      `<text class="band-label" x="${f1((xOf(bandLowM) + xOf(bandHighM)) / 2)}" y="${PAD.top - 8}" text-anchor="middle">near-optimal band</text>`,
    );
  }
  counts.forEach((c, i) => {
    if (c === 0) return;
    const lo = i * binM;
    const hi = lo + binM;
    const what = i === nBins ? `${label(lo)} or more` : `${label(lo)} to ${label(hi)}`;
    const x = f1(xOf(lo) + 1);
    const w = f1(Math.max(1, xOf(hi) - xOf(lo) - 2));
    const rect = (cls: string, from: number, k: number, title: string) =>
      `<rect class="${cls}" x="${x}" y="${f1(yOf(from + k))}" width="${w}" height="${f1(yOf(from) - yOf(from + k))}"><title>${title}</title></rect>`;
    parts.push(rect('bar', 0, c, `${what}: ${c} gaps`));
    // below their pattern's band at the foot of the bar, the wide ones above them
    if (shortCounts[i] > 0) parts.push(rect('bar close', 0, shortCounts[i], `${what}: ${shortCounts[i]} below their pattern's band`));
    if (wideCounts[i] > 0) parts.push(rect('bar wide', shortCounts[i], wideCounts[i], `${what}: ${wideCounts[i]} wide`));
  });
  // optimum and median markers
  parts.push(
    `<line class="opt-line" x1="${f1(xOf(optimalM))}" x2="${f1(xOf(optimalM))}" y1="${PAD.top}" y2="${PAD.top + plotH}"/>`,
    `<text class="marker-label" x="${f1(xOf(optimalM) + 4)}" y="${PAD.top + 12}">optimum ${label(optimalM)}</text>`,
    `<line class="median-line" x1="${f1(xOf(medianGapM))}" x2="${f1(xOf(medianGapM))}" y1="${PAD.top}" y2="${PAD.top + plotH}"/>`,
    `<text class="marker-label" x="${f1(xOf(medianGapM) + 4)}" y="${PAD.top + 28}">today's median ${label(medianGapM)}</text>`,
  );
  // axes
  const axisY = PAD.top + plotH;
  parts.push(`<line class="axis" x1="${PAD.left}" x2="${WIDTH - PAD.right}" y1="${axisY}" y2="${axisY}"/>`);
  const tickStepM = units === 'imperial' ? 1000 * 0.3048 : 200;
  for (let m = 0; m <= (nBins + 1) * binM + 1e-9; m += tickStepM) {
    parts.push(
      `<text class="tick" x="${f1(xOf(m))}" y="${axisY + 16}" text-anchor="middle">${units === 'imperial' ? Math.round(metresToFeet(m)) : Math.round(m)}</text>`,
    );
  }
  parts.push(
    `<text class="axis-label" x="${PAD.left + plotW / 2}" y="${HEIGHT - 6}" text-anchor="middle">gap between consecutive stops (${units === 'imperial' ? 'ft' : 'm'}); last bar: ${label(nBins * binM)} or more</text>`,
  );
  parts.push(`<text class="tick" x="${PAD.left - 6}" y="${PAD.top + 4}" text-anchor="end">${top}</text>`);
  parts.push(`<text class="tick" x="${PAD.left - 6}" y="${axisY}" text-anchor="end">0</text>`);
  parts.push(`<text class="axis-label" transform="translate(14 ${PAD.top + plotH / 2}) rotate(-90)" text-anchor="middle">gaps</text>`);
  parts.push('</svg>');
  return parts.join('');
}

function quantile(values: number[], q: number): number {
  const v = values.filter(Number.isFinite).sort((a, b) => a - b);
  if (v.length === 0) return 0;
  return v[Math.min(v.length - 1, Math.floor(q * v.length))];
}
