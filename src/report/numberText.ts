// Numbers as people read them in the reports, en-US style: thousands grouped with commas and a fixed
// number of decimals, exactly as Intl.NumberFormat('en-US') with equal minimum and maximum fraction digits
// prints them. Written out because the first use of ICU's number formatting costs 10-25 ms of every run
// (measured), more than the page spends formatting all of its numbers with it.

let intlFormats: Map<number, Intl.NumberFormat> | null = null;

/** The rare cases (not finite, 1e21 and above, below 1e-6, or unusual digits) go to ICU itself. */
function viaIntl(v: number, digits: number): string {
  intlFormats ??= new Map();
  let f = intlFormats.get(digits);
  if (!f) intlFormats.set(digits, (f = new Intl.NumberFormat('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits })));
  return f.format(v);
}

/** Digits of a non-negative integer string grouped by three with commas: "1234567" -> "1,234,567". */
function group(intDigits: string): string {
  if (intDigits.length <= 3) return intDigits;
  const head = intDigits.length % 3 || 3;
  let out = intDigits.slice(0, head);
  for (let i = head; i < intDigits.length; i += 3) out += ',' + intDigits.slice(i, i + 3);
  return out;
}

/**
 * v with exactly `digits` decimals (0-20) and its thousands grouped, as Intl.NumberFormat('en-US') prints
 * it: 12345.678 with 1 -> "12,345.7". Like ICU, and unlike toFixed, it rounds the shortest decimal that
 * reads back as v, half away from zero (1.005 -> "1.01", where toFixed gives "1.00"); a negative value
 * keeps its sign even when it rounds to zero ("-0.0"), and -0 prints as "-0".
 */
export function groupedFixed(v: number, digits = 0): string {
  if (!Number.isInteger(digits) || digits < 0 || digits > 20 || !Number.isFinite(v)) return viaIntl(v, digits);
  const a = Math.abs(v);
  if (a >= 1e21 || (a !== 0 && a < 1e-6)) return viaIntl(v, digits); // String() would use an exponent
  const s = String(a); // the shortest decimal that reads back as a
  const dot = s.indexOf('.');
  let int = dot < 0 ? s : s.slice(0, dot);
  let frac = dot < 0 ? '' : s.slice(dot + 1);
  if (frac.length > digits) {
    const up = frac.charCodeAt(digits) >= 53; // the first digit dropped is 5 or more: away from zero
    frac = frac.slice(0, digits);
    if (up) {
      // add one in the last place kept, carrying through nines
      const all = (int + frac).split('');
      let k = all.length - 1;
      while (k >= 0 && all[k] === '9') all[k--] = '0';
      if (k >= 0) all[k] = String.fromCharCode(all[k].charCodeAt(0) + 1);
      else all.unshift('1');
      const joined = all.join('');
      int = joined.slice(0, joined.length - digits);
      frac = joined.slice(joined.length - digits);
    }
  }
  const sign = v < 0 || Object.is(v, -0) ? '-' : '';
  return sign + group(int) + (digits > 0 ? '.' + frac.padEnd(digits, '0') : '');
}
