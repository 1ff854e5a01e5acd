// The one edit distance and the nearest names it picks; snake_case keys for JSON documents.
import { describe, expect, it } from 'vitest';
import { editDistance, nearestNames } from '../../src/common/editDistance.js';
import { snakeKey, snakeKeys } from '../../src/common/snakeKeys.js';

describe('editDistance and nearestNames', () => {
  it('counts insertions, deletions and substitutions', () => {
    // [M] the textbook example of Levenshtein distance: kitten -> sitting takes 3 edits
    expect(editDistance('kitten', 'sitting', 5)).toBe(3);
    expect(editDistance('kitten', 'sitting', 2)).toBe(3); // stops early: max + 1
    expect(editDistance('', 'abc', 5)).toBe(3);
  });

  it('lists the nearest names first, none too far', () => {
    const names = ['Market St / Glebe Rd', 'Market St / Gorse Hill Rd', 'Harbour Sq', 'Market St / Glebe Rd'];
    expect(nearestNames('markt st / glebe rd', names, { max: 4, limit: 5, key: (s) => s.toLowerCase() })).toEqual(['Market St / Glebe Rd']);
    expect(nearestNames('Harbor Sq', names, { max: 2, limit: 5 })).toEqual(['Harbour Sq']);
    expect(nearestNames('Elsewhere', names, { max: 2, limit: 5 })).toEqual([]);
  });
});

describe('snakeKeys', () => {
  it('turns camelCase keys into snake_case, deeply, and leaves values alone', () => {
    expect(snakeKey('walkAddedPaxMinPerDay')).toBe('walk_added_pax_min_per_day');
    expect(snakeKey('runTimeSavedPerTripS')).toBe('run_time_saved_per_trip_s');
    expect(snakeKey('max_gap_m')).toBe('max_gap_m');
    expect(snakeKeys({ patterns: [{ patternId: 'R1:0:1', removedStopIds: ['camelStop'] }] })).toEqual({
      patterns: [{ pattern_id: 'R1:0:1', removed_stop_ids: ['camelStop'] }],
    });
  });
});
