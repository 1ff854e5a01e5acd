// The one line an error prints: where, what, and the value it got, once.
import { describe, expect, it } from 'vitest';
import { StopspanError } from '../../src/common/errors.js';

describe('StopspanError.oneLine', () => {
  it('names the file, line and column, then the message and the value it got', () => {
    const e = new StopspanError('bad-value', 'stop_lat is not a number', {
      file: 'stops.txt',
      line: 4,
      column: 'stop_lat',
      value: 'north',
    });
    expect(e.oneLine()).toBe('stops.txt:4 column stop_lat: stop_lat is not a number (got "north")');
  });

  it('does not repeat a value the message already quotes', () => {
    const name = 'Market St / Glebe Rd';
    const quoted = new StopspanError('bad-option', `stop name ${JSON.stringify(name)} is ambiguous (2 stops)`, { value: name });
    expect(quoted.oneLine()).toBe('stop name "Market St / Glebe Rd" is ambiguous (2 stops)');
    const got = new StopspanError('bad-option', 'invalid --walk-weight: expected a number above 0, got -1', { value: '-1' });
    expect(got.oneLine()).toBe('invalid --walk-weight: expected a number above 0, got -1');
    // a value that only happens to appear inside other words is still shown
    const incidental = new StopspanError('bad-value', 'line 1 of trips.txt has 1 field', { value: '1' });
    expect(incidental.oneLine()).toBe('line 1 of trips.txt has 1 field (got "1")');
  });
});
