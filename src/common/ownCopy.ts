// Strings of their own: a value cut from a decoded chunk of a table is a view into the whole chunk, so
// keeping the value keeps the chunk alive. What is kept after a table is read is copied with ownCopy.

/**
 * A string equal to s that holds its own characters. V8 cuts a substring of 13 or more characters as a
 * view into the string it came from: a copy is made by slicing a one-character-longer string that the
 * engine first makes whole (its own characters; the view is then into that copy alone).
 */
export function ownCopy(s: string): string {
  return s.length < 13 ? s : (' ' + s).slice(1);
}
