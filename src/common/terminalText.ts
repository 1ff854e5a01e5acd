// The one rule for showing untrusted text (anything from a feed, a data file or a database) on a
// terminal: every character that is not meant to be seen is shown as an escape instead, so feed text can
// neither break a line, send escape sequences, reorder what follows it (bidi overrides) nor hide itself
// (zero-width characters). Used by the error line and by every plain-text renderer.

/**
 * C0 and C1 controls and DEL (Unicode Cc), format characters (Cf: bidi embeddings, overrides and
 * isolates, zero-width spaces and joiners, the byte-order mark, soft hyphen, tag characters), the line and
 * paragraph separators (Zl, Zp) and lone surrogate halves (Cs).
 */
export const UNSEEN_CHARS = /[\p{Cc}\p{Cf}\p{Zl}\p{Zp}\p{Cs}]/gu;

/** `s` with each unseen character shown as \uXXXX (\u{XXXXX} beyond the BMP); other text, non-ASCII letters included, as it was. */
export function terminalText(s: string): string {
  return s.replace(UNSEEN_CHARS, (c) => {
    const cp = c.codePointAt(0) as number;
    return cp > 0xffff ? `\\u{${cp.toString(16)}}` : `\\u${cp.toString(16).padStart(4, '0')}`;
  });
}
