// How a piece of work grows with its size, measured so that the machine's load cannot pass for growth:
// k runs of the small case are timed against one run of a case k times as large, so both sides take
// about as long and meet the same noise. Linear work gives a ratio near 1, quadratic near k.

/** Least of `tries` timings of `run`, in ms (the machine's noise only ever adds). */
function leastMs(run: () => void, tries: number): number {
  let best = Infinity;
  for (let t = 0; t < tries; t++) {
    const t0 = performance.now();
    run();
    best = Math.min(best, performance.now() - t0);
  }
  return best;
}

/**
 * Time of one large run over the time of `k` small runs (the large case being k times the small one):
 * about 1 when the work is linear in the size, about k when quadratic.
 */
export function growthRatio(small: () => void, large: () => void, k: number, tries = 3): { ratio: number; text: string } {
  small(); // warm the code up on both sizes
  large();
  const smallMs = leastMs(() => {
    for (let r = 0; r < k; r++) small();
  }, tries);
  const largeMs = leastMs(large, tries);
  return { ratio: largeMs / smallMs, text: `${k} small runs ${smallMs.toFixed(1)} ms, one run ${k} times larger ${largeMs.toFixed(1)} ms` };
}
