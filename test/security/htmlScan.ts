// Test helper: a small HTML tokenizer following the WHATWG tokenization rules that matter for injection
// (a tag opens only at "<" followed by a letter, "/" or "!"; attribute values are double-, single- or
// unquoted; <script> and <style> hold raw text up to the first "</script" or "</style"; comments run to
// "-->"). It lists tags with their attributes (values decoded), text runs (decoded) and raw-text bodies,
// so a test can say which elements and attributes exist and what text a reader would see.

export interface Attr {
  name: string;
  raw: string | null; // as written, without the quotes; null for a bare attribute
  value: string; // entity-decoded
}
export interface Tag {
  name: string;
  closing: boolean;
  attrs: Attr[];
}
export interface RawText {
  tag: string; // 'script' or 'style'
  attrs: Attr[];
  body: string;
}
export interface HtmlScan {
  tags: Tag[];
  texts: string[]; // decoded text runs outside tags and raw-text elements
  rawTexts: RawText[];
  bareLessThan: number; // "<" in text not starting a tag (the tokenizer keeps it as text)
  unknownEntities: string[];
}

const NAMED: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'", nbsp: '\u00a0' };

export function decodeEntities(s: string, unknown: string[] = []): string {
  return s.replace(/&(#x[0-9a-f]+|#\d+|[a-z][a-z0-9]*);/gi, (m, body: string) => {
    if (body[0] === '#') {
      const cp = body[1] === 'x' || body[1] === 'X' ? parseInt(body.slice(2), 16) : parseInt(body.slice(1), 10);
      return String.fromCodePoint(cp);
    }
    const v = NAMED[body.toLowerCase()];
    if (v === undefined) {
      unknown.push(m);
      return m;
    }
    return v;
  });
}

export function scanHtml(html: string): HtmlScan {
  const out: HtmlScan = { tags: [], texts: [], rawTexts: [], bareLessThan: 0, unknownEntities: [] };
  let i = 0;
  let text = '';
  const flush = () => {
    if (text) out.texts.push(decodeEntities(text, out.unknownEntities));
    text = '';
  };
  while (i < html.length) {
    const lt = html.indexOf('<', i);
    if (lt < 0) {
      text += html.slice(i);
      break;
    }
    text += html.slice(i, lt);
    const next = html[lt + 1] ?? '';
    if (html.startsWith('<!--', lt)) {
      flush();
      const end = html.indexOf('-->', lt + 4);
      i = end < 0 ? html.length : end + 3;
      continue;
    }
    if (next === '!' || next === '?') {
      flush();
      const end = html.indexOf('>', lt);
      i = end < 0 ? html.length : end + 1;
      continue;
    }
    const closing = next === '/';
    const nameStart = closing ? lt + 2 : lt + 1;
    if (!/[a-zA-Z]/.test(html[nameStart] ?? '')) {
      out.bareLessThan++;
      text += '<';
      i = lt + 1;
      continue;
    }
    flush();
    let j = nameStart;
    while (j < html.length && !/[\s/>]/.test(html[j])) j++;
    const name = html.slice(nameStart, j).toLowerCase();
    const attrs: Attr[] = [];
    // attributes until ">"
    for (;;) {
      while (j < html.length && /[\s/]/.test(html[j])) j++;
      if (j >= html.length || html[j] === '>') break;
      let k = j;
      while (k < html.length && !/[\s/>=]/.test(html[k])) k++;
      if (k === j) k++; // a stray "=" starts an attribute name, as the tokenizer does
      const an = html.slice(j, k).toLowerCase();
      j = k;
      while (j < html.length && /\s/.test(html[j])) j++;
      if (html[j] !== '=') {
        attrs.push({ name: an, raw: null, value: '' });
        continue;
      }
      j++;
      while (j < html.length && /\s/.test(html[j])) j++;
      let raw: string;
      if (html[j] === '"' || html[j] === "'") {
        const q = html[j];
        const end = html.indexOf(q, j + 1);
        raw = html.slice(j + 1, end < 0 ? html.length : end);
        j = end < 0 ? html.length : end + 1;
      } else {
        let e = j;
        while (e < html.length && !/[\s>]/.test(html[e])) e++;
        raw = html.slice(j, e);
        j = e;
      }
      attrs.push({ name: an, raw, value: decodeEntities(raw, out.unknownEntities) });
    }
    i = j + 1;
    out.tags.push({ name, closing, attrs });
    if (!closing && (name === 'script' || name === 'style')) {
      const m = new RegExp(`</${name}[\\s/>]`, 'i').exec(html.slice(i));
      const end = m ? i + m.index : html.length;
      out.rawTexts.push({ tag: name, attrs, body: html.slice(i, end) });
      i = end;
    }
  }
  flush();
  return out;
}

/** Every string inside a parsed JSON value, recursively. */
export function jsonStrings(v: unknown, out: string[] = []): string[] {
  if (typeof v === 'string') out.push(v);
  else if (Array.isArray(v)) for (const x of v) jsonStrings(x, out);
  else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) (jsonStrings(k, out), jsonStrings(x, out));
  return out;
}
