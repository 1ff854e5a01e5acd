// The error for a required column that a table's header lacks. A header can look right and still miss:
// a zero-width space or a byte-order mark glued to a name, a name in capitals, a typing slip. So the
// message shows the names the header holds (the error line escapes unseen characters, so they become
// visible) and points at the one that is nearly the name asked for.

import { StopspanError } from '../common/errors.js';
import { UNSEEN_CHARS } from '../common/terminalText.js';
import { editDistance } from '../common/editDistance.js';

/** Names listed in the message at most; the rest are counted. */
const SHOWN_NAMES = 12;

/** A name as a person reads it: without unseen characters (terminalText's), without spaces, in lower case. */
function seenAs(name: string): string {
  return name.replace(UNSEEN_CHARS, '').replace(/\s+/g, '').toLowerCase();
}

/**
 * The header name that is nearly `column`, and how it differs; null when none is close. Names in `known`
 * (the table's other columns, such as stop_lat beside a missing stop_lon) are columns in their own right,
 * never a slip for this one.
 */
export function nearColumn(
  header: readonly string[],
  column: string,
  known: ReadonlySet<string> = new Set(),
): { name: string; how: string } | null {
  for (const h of header) {
    if (h === column || seenAs(h) !== column) continue;
    return {
      name: h,
      how: h.replace(UNSEEN_CHARS, '') !== h ? 'by unseen characters' : h.toLowerCase() === column ? 'in case' : 'by spaces',
    };
  }
  let best: { name: string; d: number } | null = null;
  for (const h of header) {
    if (known.has(h)) continue;
    const d = editDistance(seenAs(h), column, 2);
    if (d <= 2 && (best === null || d < best.d)) best = { name: h, d };
  }
  return best && column.length >= 5 ? { name: best.name, how: `by ${best.d} letter${best.d === 1 ? '' : 's'}` } : null;
}

/** 'missing-column' for `column` of `file`, naming the header's names and the near match if any (`known`: see nearColumn). */
export function missingColumn(
  file: string,
  header: readonly string[],
  column: string,
  { why = '', known = new Set<string>() }: { why?: string; known?: ReadonlySet<string> } = {},
): StopspanError {
  const names = header.filter((h) => h !== '');
  const listed = names.slice(0, SHOWN_NAMES).map((h) => JSON.stringify(h));
  const more = names.length > SHOWN_NAMES ? ` and ${names.length - SHOWN_NAMES} more` : '';
  const seen = names.length === 0 ? 'the header is empty' : `the header has ${listed.join(', ')}${more}`;
  const near = nearColumn(names, column, known);
  const hint = near ? `; ${JSON.stringify(near.name)} differs from ${column} ${near.how}` : '';
  return new StopspanError('missing-column', `required column ${column} is missing${why}: ${seen}${hint}`, { file, line: 1, column });
}
