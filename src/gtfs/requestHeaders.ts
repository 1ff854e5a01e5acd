// The headers a download sends on the user's behalf (`--header NAME:VALUE`, e.g. an API key): checked
// before anything is fetched, kept to the host the user named (never sent on to another host after a
// redirect, nor in clear after a redirect from https to http), and never printed: errors name the header,
// not its value. Also strips the credentials out of a URL before it is shown or stored.

import { StopspanError } from '../common/errors.js';

/** Header names as HTTP defines a token. */
const TOKEN = /^[!#$%&'*+.^_`|~0-9A-Za-z-]+$/;
/** Tab and visible characters only: no CR, LF, NUL or other control character that could split a request. */
const FIELD_VALUE = /^[\t\x20-\x7e\x80-\xff]*$/;
/** Headers the download itself sets or that would change how the request is framed. */
const RESERVED = new Set([
  'host',
  'content-length',
  'transfer-encoding',
  'connection',
  'keep-alive',
  'upgrade',
  'te',
  'trailer',
  'expect',
  'proxy-authorization',
  'proxy-connection',
  'if-none-match',
  'if-modified-since',
]);
/** The longest header line accepted, in characters: far above an API key, far below a server's limit. */
const MAX_HEADER_CHARS = 8192;

/** Extra request headers by lower-case name. */
export type RequestHeaders = Record<string, string>;

function badHeader(why: string, name?: string): StopspanError {
  // the value is never quoted: it is often a secret
  return new StopspanError('bad-option', `invalid option --header: ${why}`, name === undefined ? {} : { value: name });
}

/** Checks one header name and value; throws bad-option naming the header, never its value. */
export function checkHeader(name: string, value: string): [string, string] {
  if (!TOKEN.test(name)) throw badHeader('expected NAME:VALUE with a name of letters, digits and -', name.slice(0, 40));
  const lower = name.toLowerCase();
  if (RESERVED.has(lower)) throw badHeader(`the ${lower} header is set by the download itself`, name);
  const v = value.replace(/^[ \t]+|[ \t]+$/g, ''); // spaces and tabs around it only: a line break is refused below
  if (!FIELD_VALUE.test(v)) throw badHeader(`the value of ${name} has a line break or control character`, name);
  if (name.length + v.length > MAX_HEADER_CHARS) throw badHeader(`the ${name} header is longer than ${MAX_HEADER_CHARS} characters`, name);
  return [lower, v];
}

/** Parses `NAME:VALUE` strings (as --header takes them) into headers; a repeated name joins its values with ", ". */
export function parseHeaderOptions(specs: readonly string[]): RequestHeaders {
  const pairs = specs.map((spec): [string, string] => {
    const colon = spec.indexOf(':');
    if (colon <= 0) throw badHeader('expected NAME:VALUE');
    return [spec.slice(0, colon).trim(), spec.slice(colon + 1)];
  });
  return joinHeaders(pairs);
}

/** Checks headers given to the library (an object or name-value pairs) as --header checks them. */
export function checkHeaders(headers: RequestHeaders | readonly (readonly [string, string])[] | undefined): RequestHeaders {
  if (headers === undefined) return {};
  const pairs = Array.isArray(headers) ? headers : Object.entries(headers);
  for (const p of pairs)
    if (!Array.isArray(p) || typeof p[0] !== 'string' || typeof p[1] !== 'string') throw badHeader('expected names and text values');
  return joinHeaders(pairs as readonly (readonly [string, string])[]);
}

function joinHeaders(pairs: readonly (readonly [string, string])[]): RequestHeaders {
  const out: RequestHeaders = {};
  for (const [rawName, rawValue] of pairs) {
    const [name, value] = checkHeader(rawName, rawValue);
    out[name] = Object.hasOwn(out, name) ? `${out[name]}, ${value}` : value;
  }
  return out;
}

/**
 * Whether the user's headers may go to `to`, a URL reached from `from` (the URL the user gave) by
 * redirects: only on the same host, and not from https down to plain http.
 */
export function sameTrust(from: URL, to: URL): boolean {
  if (from.hostname.toLowerCase() !== to.hostname.toLowerCase()) return false;
  return !(from.protocol === 'https:' && to.protocol !== 'https:');
}

/** An http(s) URL without its user name and password, to show in messages or keep on disk; a path is left as it is. */
export function shownUrl(url: string): string {
  if (!/^https?:\/\//i.test(url)) return url;
  try {
    const u = new URL(url);
    if (!u.username && !u.password) return url;
    u.username = '';
    u.password = '';
    return u.toString();
  } catch {
    return url.replace(/\/\/[^/@]*@/, '//');
  }
}

/** An Authorization or Proxy-Authorization value (Basic) from a URL's user name and password, if it has them. */
export function basicAuth(u: URL): string | undefined {
  if (!u.username && !u.password) return undefined;
  const pair = `${decodeURIComponent(u.username)}:${decodeURIComponent(u.password)}`;
  return `Basic ${Buffer.from(pair, 'utf8').toString('base64')}`;
}
