// Escaping for the HTML page: feed text goes into element text and attribute values, and the page's
// data goes into a <script type="application/json"> block. One function per context.

const HTML_ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Escapes text for HTML element content and for quoted attribute values alike. */
export function escapeHtml(value: unknown): string {
  return String(value).replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]);
}

/**
 * JSON for embedding inside a <script> element: "<" becomes \u003c so no "</script>" or "<!--" can close or
 * confuse the element, and U+2028/U+2029 are escaped for older parsers. JSON.parse reads it back unchanged.
 */
export function jsonForScript(value: unknown): string {
  // one pass over the page's data (most of the page) for all five characters, not one pass each
  return JSON.stringify(value).replace(/[<>&\u2028\u2029]/g, (c) => SCRIPT_ESCAPES[c]);
}

const SCRIPT_ESCAPES: Record<string, string> = { '<': '\\u003c', '>': '\\u003e', '&': '\\u0026', '\u2028': '\\u2028', '\u2029': '\\u2029' };
