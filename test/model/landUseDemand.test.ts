// Assumed riders placed by a land-use layer's people: the pattern's riders are the assumed total
// (boardings per trip-km x km x trips [D]), their trip ends go only where people are, the figures are
// labelled land-use, and a pattern with nobody in its catchments holds no riders without being called too
// short for a trip.
import { describe, expect, it } from 'vitest';
import { assumedDemand } from '../../src/model/demand.js';

const POS = [0, 400, 800, 1200, 1600, 2000];

describe('assumed demand placed by land use', () => {
  it('keeps the assumed total and puts trip ends only at stops with people', () => {
    const people = [300, 0, 500, 0, 200, 400];
    const d = assumedDemand('P', POS, 100, { boardingsPerTripKm: 2, meanTripM: 1500, peopleAtStops: people });
    expect(d.demandSource).toBe('land-use');
    // [D] 2 boardings per trip-km x 2 km x 100 trips = 400 boardings a day
    expect(d.ridersPerDay).toBeCloseTo(400, 6);
    people.forEach((p, j) => {
      if (p === 0) expect(d.boardPerDay[j] + d.alightPerDay[j]).toBe(0);
      else expect(d.boardPerDay[j] + d.alightPerDay[j]).toBeGreaterThan(0);
    });
  });

  it('gives a pattern with nobody near it no riders, and no too-short warning', () => {
    const d = assumedDemand('P', POS, 100, { boardingsPerTripKm: 2, meanTripM: 1500, peopleAtStops: POS.map(() => 0) });
    expect(d.ridersPerDay).toBe(0);
    expect(d.tooShortForTrip).toBe(false);
  });
});
