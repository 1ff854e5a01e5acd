// The page's inline script: reads the embedded JSON data block and draws the interactive parts (cost
// curve with a pattern chooser, sortable and filterable tables, per-pattern strip diagrams and
// schematic maps rendered only when their <details> is opened, with the audit's candidates and the
// optimiser's plan marked on them). On a large network the pattern sections are made in chunks, as the
// list is scrolled, filtered by route or name, or linked to, so the page is ready before all exist.
// Feed text is only ever set through textContent or setAttribute, never parsed as markup. Plain
// ES2020, no template literals, no network.
// The verdicts' letters and legend come from the verdict table (src/audit/verdictKinds.ts).

import type { Verdict } from '../../audit/types.js';
import { VERDICTS, type VerdictKind } from '../../audit/verdictKinds.js';

const kinds = Object.entries(VERDICTS) as [Verdict, VerdictKind][];
/** The verdict of each letter, and the legend's rows, written into the script from the verdict table. */
const verdictTextJs = `{ ${kinds.map(([v, k]) => `${k.letter}: '${v}'`).join(', ')} }`;
const legendJs = `[${kinds.map(([, k]) => `['${k.letter}', '${k.legend}']`).join(', ')}]`;

export const PAGE_SCRIPT = String.raw`
(function () {
  'use strict';
  var D = JSON.parse(document.getElementById('report-data').textContent);
  var SVGNS = 'http://www.w3.org/2000/svg';
  var IMP = D.units === 'imperial';
  var VERDICT_TEXT = ${verdictTextJs};

  function el(tag, attrs, text) {
    var e = document.createElement(tag);
    if (attrs) for (var k in attrs) e.setAttribute(k, attrs[k]);
    if (text !== undefined && text !== null) e.textContent = String(text);
    return e;
  }
  function sv(tag, attrs, text) {
    var e = document.createElementNS(SVGNS, tag);
    if (attrs) for (var k in attrs) e.setAttribute(k, String(attrs[k]));
    if (text !== undefined && text !== null) e.textContent = String(text);
    return e;
  }
  // one formatter per number of decimals: toLocaleString with options builds a new one on every call
  var FORMATS = {};
  var COLLATE = new Intl.Collator('en', { numeric: true }); // one collator for every sort (localeCompare with options makes one per call)
  function num(v, d) {
    if (v === null || v === undefined || !isFinite(v)) return '–';
    var k = d || 0;
    var f = FORMATS[k] || (FORMATS[k] = new Intl.NumberFormat('en-US', { minimumFractionDigits: k, maximumFractionDigits: k }));
    return f.format(Number(v));
  }
  function len(m) {
    if (m === null || m === undefined || !isFinite(m)) return '–';
    return IMP ? num(m / 0.3048) + ' ft' : num(m) + ' m';
  }
  function longLen(m) {
    return IMP ? num(m / 1609.344, 1) + ' mi' : num(m / 1000, 1) + ' km';
  }
  // cruise speed as people read it: km/h, or mph with --units imperial
  function speed(mps) { return IMP ? num(mps * 2.236936, 0) + ' mph' : num(mps * 3.6, 0) + ' km/h'; }
  var STOPPING = { always: 'at every stop (demand assumed)', poisson: 'where riders board or alight (Poisson)', observed: 'as often as observed' };
  function lenUnit() { return IMP ? 'ft' : 'm'; }
  function toUnit(m) { return IMP ? m / 0.3048 : m; }
  function signed(v, d) {
    if (v === null || v === undefined || !isFinite(v)) return '–';
    return (v > 0 ? '+' : '') + num(v, d);
  }
  // a round tick step (1, 2 or 5 times a power of ten) giving about n ticks over span
  function niceStep(span, n) {
    var raw = Math.max(span, 1e-9) / n, p = Math.pow(10, Math.floor(Math.log(raw) / Math.LN10)), f = raw / p;
    return (f < 1.5 ? 1 : f < 3.5 ? 2 : f < 7.5 ? 5 : 10) * p;
  }
  function decimalsFor(step) {
    return step >= 10 ? 0 : Math.min(3, Math.max(1, Math.ceil(-Math.log(step) / Math.LN10)));
  }
  function assumedTag(src) { return src === 'assumed' ? ' (assumed demand)' : ''; }
  function patternLabel(p) {
    return 'Route ' + p.routeName + ' to ' + p.headsign + ' (' + p.id + ')';
  }
  var ROUTE_NAME = {}, PATTERN_BY_ID = {};
  D.patterns.forEach(function (p) {
    if (!(p.route in ROUTE_NAME)) ROUTE_NAME[p.route] = p.routeName;
    PATTERN_BY_ID[p.id] = p;
  });
  D.candidates.forEach(function (c) { c.routeNames = c.routes.map(function (r) { return r in ROUTE_NAME ? ROUTE_NAME[r] : r; }); });
  // a pattern's rows as the drawing reads them, expanded once when its section is first opened:
  // stops [index, stop_id, name, lat, lon, dist, verdict letter, fixed reason, timepoint, removal net,
  // boardings, alightings] from the shared stop table, the path as [lon, lat] from whole 1e-5 degree steps
  function expand(p) {
    if (p.expanded) return;
    p.expanded = true;
    p.stops = p.stops.map(function (r, i) {
      var s = D.stopTable[r[0]];
      return [i, s[0], s[1], s[2], s[3], r[1], r[2], r[3], r[4], r[5], r[6], r[7]];
    });
    var path = [], x = 0, y = 0;
    for (var i = 0; i + 1 < p.path.length; i += 2) { x += p.path[i]; y += p.path[i + 1]; path.push([x / 1e5, y / 1e5]); }
    p.path = path;
  }

  // ---- verdict markers: shape and colour together, so colour is never the only cue ----
  function marker(v, x, y, r) {
    if (v === 'C') return sv('path', { 'class': 'shape mk-close', d: 'M' + (x - r) + ' ' + (y - r * 0.8) + 'L' + (x + r) + ' ' + (y - r * 0.8) + 'L' + x + ' ' + (y + r) + 'Z' });
    if (v === 'W') return sv('path', { 'class': 'shape mk-wide', d: 'M' + x + ' ' + (y - r * 1.1) + 'L' + (x + r * 1.1) + ' ' + y + 'L' + x + ' ' + (y + r * 1.1) + 'L' + (x - r * 1.1) + ' ' + y + 'Z' });
    if (v === 'F') return sv('rect', { 'class': 'shape mk-fixed', x: x - r * 0.85, y: y - r * 0.85, width: r * 1.7, height: r * 1.7 });
    return sv('circle', { 'class': 'shape mk-ok', cx: x, cy: y, r: r * 0.8 });
  }
  // one legend entry: a drawn sample (width x 16 or 12 px) and its words
  function legendEntry(box, shape, w, h, text) {
    var s = sv('svg', { width: w, height: h, viewBox: '0 0 ' + w + ' ' + h, 'aria-hidden': 'true' });
    s.appendChild(shape);
    var span = el('span');
    span.appendChild(s);
    span.appendChild(document.createTextNode(' ' + text));
    box.appendChild(span);
  }
  function legend() {
    var box = el('div', { 'class': 'legend' });
    ${legendJs}.forEach(function (it) { legendEntry(box, marker(it[0], 8, 8, 6), 16, 16, it[1]); });
    // a gap's line style and its words
    [['gap-wide', 'wide gap (above the band), labelled W'], ['gap-empty', 'empty stretch: a wide gap with no sign anyone is there, listed for review, labelled E']].forEach(function (it) {
      legendEntry(box, sv('line', { 'class': it[0], x1: 1, x2: 25, y1: 6, y2: 6 }), 26, 12, it[1]);
    });
    // the audit's candidates and the optimiser's plan
    [[candShape('remove', 8, 8, 6), 'candidate: remove this stop (ring; #rank in the candidate list)'],
      [candShape('add', 8, 8, 6), 'candidate: add a stop here (plus; #rank)'],
      [keepMark(8, 8, 5), 'the optimiser\u2019s plan keeps the stop (upright bar, plan row of the strip)'],
      [dropMark(8, 8, 4.5), 'the optimiser\u2019s plan drops the stop (cross)']].forEach(function (it) { legendEntry(box, it[0], 16, 16, it[1]); });
    // the land-use layer under the map, when the audit had one
    if (D.density) {
      var sample = sv('g');
      [0.1, 0.3, 0.48].forEach(function (o, n) { sample.appendChild(sv('rect', { 'class': 'density', x: 1 + n * 9, y: 3, width: 8, height: 10, 'fill-opacity': o })); });
      legendEntry(box, sample, 28, 16, 'on the map, where people are (land-use layer): squares within ' + len(D.density.near) + ' of the pattern\u2019s stops, lighter to darker by people per ' + len(D.density.m) + ' square, darkest from ' + num(D.density.top) + ' up');
    }
    return box;
  }
  function stopTitle(p, s) {
    var parts = [s[2] + ' (stop ' + s[1] + ')', 'stop ' + (s[0] + 1) + ' of ' + p.stops.length + ', ' + len(s[5]) + ' along',
      'verdict: ' + VERDICT_TEXT[s[6]] + (s[7] ? ' (' + s[7] + ')' : '')];
    var prev = p.stops[s[0] - 1], next = p.stops[s[0] + 1];
    if (prev) parts.push('gap before ' + len(s[5] - prev[5]));
    if (next) parts.push('gap after ' + len(next[5] - s[5]));
    parts.push('boardings ' + num(s[10]) + '/day, alightings ' + num(s[11]) + '/day' + assumedTag(p.demand));
    if (s[9] !== null) parts.push('removing it: ' + signed(s[9], 1) + ' passenger-min/day' + assumedTag(p.demand));
    if (s[8]) parts.push('timepoint');
    return parts.join('; ');
  }
  function stopGroup(p, s, shape, info) {
    var g = sv('g', { 'class': 'stop', tabindex: '0', role: 'img', 'aria-label': stopTitle(p, s) });
    g.appendChild(sv('title', null, stopTitle(p, s)));
    g.appendChild(shape);
    var show = function () { info.textContent = stopTitle(p, s); };
    g.addEventListener('mouseenter', show);
    g.addEventListener('focus', show);
    return g;
  }

  // ---- the audit's candidates and the optimiser's plan on a pattern ----
  function candTitle(c) {
    return 'Candidate #' + c.rank + ': ' + (c.action === 'remove' ? 'remove ' + c.name + (c.id ? ' (stop ' + c.id + ')' : '') : 'add a stop ' + c.name) +
      '; ' + signed(c.net, 1) + ' passenger-min/day over all its patterns' + (D.assumed ? ' (assumed demand)' : '') + (c.robust ? '' : '; not robust to the sensitivity cases');
  }
  // a removal rings its stop; an addition is a plus in a disc at its site; one colour, two shapes
  function candShape(action, x, y, r) {
    var g = sv('g', { 'class': 'shape' });
    if (action === 'remove') g.appendChild(sv('circle', { 'class': 'cand-ring', cx: x, cy: y, r: r }));
    else {
      g.appendChild(sv('circle', { 'class': 'cand-add', cx: x, cy: y, r: r }));
      g.appendChild(sv('path', { 'class': 'cand-plus', d: 'M' + (x - r * 0.6) + ' ' + y + 'H' + (x + r * 0.6) + 'M' + x + ' ' + (y - r * 0.6) + 'V' + (y + r * 0.6) }));
    }
    return g;
  }
  function candGroup(c, shape, info) {
    var t = candTitle(c);
    var g = sv('g', { 'class': 'cand', tabindex: '0', role: 'img', 'aria-label': t, 'data-rank': c.rank });
    g.appendChild(sv('title', null, t));
    g.appendChild(shape);
    var show = function () { info.textContent = t; };
    g.addEventListener('mouseenter', show);
    g.addEventListener('focus', show);
    return g;
  }
  function keepMark(x, y, r) { return sv('path', { 'class': 'plan-keep', d: 'M' + x + ' ' + (y - r) + 'V' + (y + r) }); }
  function dropMark(x, y, r) {
    return sv('path', { 'class': 'plan-drop', d: 'M' + (x - r) + ' ' + (y - r) + 'L' + (x + r) + ' ' + (y + r) + 'M' + (x + r) + ' ' + (y - r) + 'L' + (x - r) + ' ' + (y + r) });
  }
  // the positions of the stops the optimiser's plan drops, as a set
  function dropSet(p) {
    var out = {};
    (p.drops || []).forEach(function (i) { out[i] = 1; });
    return out;
  }
  // the candidates on a pattern, best first: [candidate, stop position or -1]
  function candsOf(p) {
    return (p.cands || []).map(function (e) { return [D.candidates[e[0]], e[1]]; }).sort(function (a, b) { return a[0].rank - b[0].rank; });
  }
  var MAP_CAND_LABELS = 40; // labels beyond the best 40 would cover the map; every mark keeps its name

  // ---- strip diagram: stops by distance along the route ----
  function strip(p, info) {
    var n = p.stops.length, W = Math.max(880, n * 18), H = 190, L = 24, R = 24, y = 84, py = y + 52;
    var total = p.len > 0 ? p.len : 1;
    function x(d) { return L + (d / total) * (W - L - R); }
    var s = sv('svg', { 'class': 'chart strip', viewBox: '0 0 ' + W + ' ' + H, width: W, height: H, role: 'group', 'aria-label': 'Strip diagram of ' + patternLabel(p) });
    s.style.maxWidth = 'none';
    s.appendChild(sv('line', { 'class': 'strip-line', x1: x(0), x2: x(total), y1: y, y2: y }));
    var labelEnd = -Infinity; // right edge of the last wide-gap label, so labels never overlap
    p.gaps.forEach(function (g) {
      if (!g[2] || !p.stops[g[0]]) return;
      var a = p.stops[g[0]][5], b = a + g[1];
      // an empty stretch (no evidence anyone is there: listed for review, no stop proposed) is drawn apart
      var empty = g[2] === 2;
      s.appendChild(sv('line', { 'class': empty ? 'gap-empty' : 'gap-wide', x1: x(a), x2: x(b), y1: y, y2: y }));
      var mid = (x(a) + x(b)) / 2, full = (empty ? 'E ' : 'W ') + len(g[1]), fullW = full.length * 6.2;
      var text = x(b) - x(a) >= fullW && mid - fullW / 2 > labelEnd + 4 ? full : mid - 5 > labelEnd + 2 ? (empty ? 'E' : 'W') : '';
      if (!text) return;
      var w = text.length === 1 ? 10 : fullW;
      labelEnd = mid + w / 2;
      s.appendChild(sv('text', { x: mid, y: y - 16, 'text-anchor': 'middle', 'class': 'marker-label' }, text));
    });
    p.stops.forEach(function (st) {
      var cx = x(st[5]);
      if (st[8]) {
        s.appendChild(sv('line', { 'class': 'mk-tp', x1: cx, x2: cx, y1: y + 10, y2: y + 20 }));
        s.appendChild(sv('text', { x: cx, y: y + 31, 'text-anchor': 'middle', 'class': 'tick' }, st[7] === 'terminal' ? 'terminal' : 'T'));
      }
      if (st[6] === 'C') s.appendChild(sv('text', { x: cx, y: y - 12, 'text-anchor': 'middle', 'class': 'marker-label' }, 'C'));
      s.appendChild(stopGroup(p, st, marker(st[6], cx, y, st[6] === 'F' && st[7] === 'terminal' ? 7.5 : 6), info));
    });
    // the optimiser's plan in a row of its own: a bar for each stop it keeps, a cross for each it drops
    var dropped = dropSet(p);
    p.stops.forEach(function (st) {
      s.appendChild(dropped[st[0]] ? dropMark(x(st[5]), py, 4) : keepMark(x(st[5]), py, 5));
    });
    s.appendChild(sv('text', { x: L, y: py + 19, 'class': 'tick' }, 'the optimiser\u2019s plan: | keeps, \u00d7 drops (' + (p.drops || []).length + ' of ' + p.stops.length + ')'));
    // candidates: a ring around a stop to remove, a plus mid-gap for a stop to add, their ranks above
    var rankEnd = -Infinity;
    candsOf(p).forEach(function (e) {
      var c = e[0], i = e[1], st = p.stops[i];
      if (!st) return;
      var cx = c.action === 'remove' ? x(st[5]) : p.stops[i + 1] ? (x(st[5]) + x(p.stops[i + 1][5])) / 2 : x(st[5]);
      s.appendChild(candGroup(c, candShape(c.action, cx, y, c.action === 'remove' ? 10 : 7), info));
      var label = '#' + c.rank, w = label.length * 6.6;
      if (cx - w / 2 > rankEnd + 3) {
        s.appendChild(sv('text', { x: cx, y: y - 30, 'text-anchor': 'middle', 'class': 'marker-label cand-label' }, label));
        rankEnd = cx + w / 2;
      }
    });
    // distance ticks every kilometre or mile
    var stepM = IMP ? 1609.344 : 1000;
    for (var d = 0; d <= total + 1; d += stepM) {
      s.appendChild(sv('line', { 'class': 'axis', x1: x(d), x2: x(d), y1: H - 22, y2: H - 16 }));
      s.appendChild(sv('text', { x: x(d), y: H - 4, 'text-anchor': 'middle', 'class': 'tick' }, Math.round(d / stepM) + (IMP ? ' mi' : ' km')));
    }
    s.appendChild(sv('text', { x: L, y: 14, 'class': 'tick' }, 'first stop'));
    s.appendChild(sv('text', { x: W - R, y: 14, 'text-anchor': 'end', 'class': 'tick' }, 'last stop, ' + longLen(total)));
    return s;
  }

  // ---- the land-use layer's people under a map: the squares in view within D.density.near of one of the
  // pattern's stops, merged into wider squares while more than D.density.max; shaded light to dark by
  // people per square of the layer's side (D.density.top and above darkest) ----
  function densityCells(p, px, view) {
    var g = D.density, out = sv('g', { 'class': 'density-cells', 'aria-hidden': 'true' });
    var mLat = 111195, cos = Math.cos(g.o[0] * Math.PI / 180), near2 = g.near * g.near;
    var stops = p.stops.map(function (st) { return [st[3], st[4]]; });
    var found = [];
    for (var c = 0; c + 2 < g.cells.length; c += 3) {
      var i = g.cells[c], j = g.cells[c + 1];
      var lat = g.o[0] + (i + 0.5) * g.step[0], lon = g.o[1] + (j + 0.5) * g.step[1];
      if (lon < view[0] || lon > view[1] || lat < view[2] || lat > view[3]) continue;
      var ok = stops.some(function (q) { var dy = (lat - q[0]) * mLat, dx = (lon - q[1]) * mLat * cos; return dx * dx + dy * dy <= near2; });
      if (ok) found.push([i, j, g.cells[c + 2]]);
    }
    var f = 1, cells = found;
    while (cells.length > g.max) {
      f++;
      var sums = {};
      found.forEach(function (x) { var key = Math.floor(x[0] / f) + ',' + Math.floor(x[1] / f); sums[key] = (sums[key] || 0) + x[2]; });
      cells = Object.keys(sums).map(function (key) { var ij = key.split(','); return [+ij[0], +ij[1], sums[key]]; });
    }
    cells.forEach(function (x) {
      var a = px([g.o[1] + x[1] * f * g.step[1], g.o[0] + (x[0] + 1) * f * g.step[0]]);
      var b = px([g.o[1] + (x[1] + 1) * f * g.step[1], g.o[0] + x[0] * f * g.step[0]]);
      var shade = Math.min(1, x[2] / (f * f) / g.top);
      out.appendChild(sv('rect', { 'class': 'density', x: a[0].toFixed(1), y: a[1].toFixed(1), width: Math.max(0.5, b[0] - a[0]).toFixed(1), height: Math.max(0.5, b[1] - a[1]).toFixed(1), 'fill-opacity': (0.06 + 0.42 * shade).toFixed(2) }));
    });
    return out;
  }
  // ---- schematic map: local equirectangular projection of the path, no tiles ----
  function map(p, info) {
    var pts = p.path.length >= 2 ? p.path : p.stops.map(function (s) { return [s[4], s[3]]; });
    var all = pts.concat(p.stops.map(function (s) { return [s[4], s[3]]; }));
    var minLon = Infinity, maxLon = -Infinity, minLat = Infinity, maxLat = -Infinity;
    all.forEach(function (q) { if (q[0] < minLon) minLon = q[0]; if (q[0] > maxLon) maxLon = q[0]; if (q[1] < minLat) minLat = q[1]; if (q[1] > maxLat) maxLat = q[1]; });
    var k = Math.cos(((minLat + maxLat) / 2) * Math.PI / 180);
    var W = 420, H = 320, pad = 22;
    var spanX = Math.max((maxLon - minLon) * k, 1e-6), spanY = Math.max(maxLat - minLat, 1e-6);
    var sc = Math.min((W - 2 * pad) / spanX, (H - 2 * pad - 20) / spanY);
    var ox = (W - spanX * sc) / 2, oy = (H - 20 - spanY * sc) / 2;
    function px(q) { return [ox + (q[0] - minLon) * k * sc, oy + (maxLat - q[1]) * sc]; }
    var s = sv('svg', { 'class': 'chart map', viewBox: '0 0 ' + W + ' ' + H, role: 'group', 'aria-label': 'Schematic map of ' + patternLabel(p) });
    if (D.density) s.appendChild(densityCells(p, px, [minLon - ox / (k * sc), minLon + (W - ox) / (k * sc), maxLat - (H - oy) / sc, maxLat + oy / sc]));
    var dpath = pts.map(function (q, i) { var c = px(q); return (i ? 'L' : 'M') + c[0].toFixed(1) + ' ' + c[1].toFixed(1); }).join('');
    s.appendChild(sv('path', { 'class': 'route-line', d: dpath }));
    p.stops.forEach(function (st) {
      var c = px([st[4], st[3]]);
      s.appendChild(stopGroup(p, st, marker(st[6], c[0], c[1], 4.5), info));
    });
    (p.drops || []).forEach(function (i) {
      var st = p.stops[i];
      if (!st) return;
      var c = px([st[4], st[3]]);
      s.appendChild(dropMark(c[0], c[1], 4));
    });
    // candidates: ring the stop to remove, a plus at the site of a stop to add; the best ones labelled
    // with their rank, right or left of the mark, where no earlier label is
    var boxes = [];
    function free(b) {
      if (b[0] < 2 || b[2] > W - 2 || b[1] < 2) return false;
      return boxes.every(function (o) { return b[2] < o[0] || b[0] > o[2] || b[3] < o[1] || b[1] > o[3]; });
    }
    candsOf(p).forEach(function (e, k) {
      var c = e[0], st = p.stops[e[1]];
      var at = c.action === 'remove' ? (st ? [st[4], st[3]] : null) : c.at ? [c.at[1], c.at[0]] : null;
      if (!at) return;
      var q = px(at);
      var g = candGroup(c, candShape(c.action, q[0], q[1], c.action === 'remove' ? 8 : 6), info);
      var label = '#' + c.rank, w = label.length * 7.2;
      var right = [q[0] + 9, q[1] - 19, q[0] + 9 + w, q[1] - 6], left = [q[0] - 9 - w, q[1] - 19, q[0] - 9, q[1] - 6];
      var b = k >= MAP_CAND_LABELS ? null : free(right) ? right : free(left) ? left : null;
      if (b) {
        boxes.push(b);
        g.appendChild(sv('text', { x: b[0], y: b[3] - 2, 'class': 'marker-label cand-label' }, label));
      }
      s.appendChild(g);
    });
    var first = px([p.stops[0][4], p.stops[0][3]]);
    var rightSide = first[0] > W * 0.7;
    s.appendChild(sv('text', { x: rightSide ? first[0] - 8 : first[0] + 8, y: first[1] - 8, 'text-anchor': rightSide ? 'end' : 'start', 'class': 'marker-label' }, 'first stop'));
    // scale bar: a round length near a quarter of the width
    var mPerPx = 111320 / sc;
    var want = mPerPx * W / 4, unitM = IMP ? 0.3048 : 1;
    var nice = IMP ? [100, 200, 500, 1000, 2000, 2640, 5280, 10560, 26400, 52800] : [100, 200, 250, 500, 1000, 2000, 2500, 5000, 10000, 20000, 50000];
    var barU = nice[0];
    nice.forEach(function (v) { if (v * unitM <= want) barU = v; });
    var barPx = barU * unitM / mPerPx;
    s.appendChild(sv('line', { 'class': 'axis', x1: 12, x2: 12 + barPx, y1: H - 12, y2: H - 12, 'stroke-width': 3 }));
    s.appendChild(sv('text', { x: 16 + barPx, y: H - 8, 'class': 'tick' }, IMP ? (barU >= 2640 ? num(barU / 5280, 1) + ' mi' : barU + ' ft') : (barU >= 1000 ? barU / 1000 + ' km' : barU + ' m')));
    s.appendChild(sv('text', { x: W - 12, y: 16, 'text-anchor': 'end', 'class': 'tick' }, 'N ↑'));
    return s;
  }

  function patternBody(p, body) {
    expand(p);
    if (!p.stops.length) { body.appendChild(el('p', { 'class': 'note' }, 'This pattern has no stops to draw.')); return; }
    var info = el('p', { 'class': 'info', 'aria-live': 'polite' }, 'Point at or tab to a stop to read its numbers.');
    var facts = el('dl', { 'class': 'kv' });
    [['stops', num(p.stops.length)], ['length', longLen(p.len)], ['trips per day', num(p.trips, 1)],
      ['median gap', len(p.median)], ['mean gap', len(p.mean)], ['modelled optimum', len(p.opt)],
      ['near-optimal band', len(p.lo) + ' to ' + len(p.hi)], ['close stops', num(p.close)], ['wide gaps', num(p.wide)],
      ['stops the optimiser keeps', num(p.optCount) + ' (its plan drops ' + num((p.drops || []).length) + ')'], ['passenger-min lost per day', num(p.lost) + assumedTag(p.demand)],
      ['lost time per stop', num(p.lostTime, 1) + ' s'], ['cruise speed', speed(p.cruise)],
      ['traffic delay per trip', p.delay === null ? 'not estimated' : num(p.delay / 60, 1) + ' min'],
      ['the bus stops', STOPPING[p.stopping] || p.stopping], ['distances from', p.distSource]].forEach(function (kv) {
      facts.appendChild(el('dt', null, kv[0]));
      facts.appendChild(el('dd', null, kv[1]));
    });
    var grid = el('div', { 'class': 'pat-grid' });
    var left = el('div');
    left.appendChild(map(p, info));
    grid.appendChild(left);
    grid.appendChild(facts);
    body.appendChild(grid);
    body.appendChild(el('h3', null, 'Stops along the route'));
    var wrap = el('div', { 'class': 'strip-wrap' });
    wrap.appendChild(strip(p, info));
    body.appendChild(wrap);
    body.appendChild(info);
    body.appendChild(legend());
    body.appendChild(candList(p));
    body.appendChild(stopTable(p));
    scrollRegions(body);
  }

  // the candidates on the pattern in words, for reading without the map (and for screen readers)
  function candList(p) {
    var box = el('div', { 'class': 'pat-cands' });
    var list = candsOf(p);
    box.appendChild(el('h3', null, 'Candidates on this pattern'));
    if (!list.length) { box.appendChild(el('p', { 'class': 'note' }, 'No candidate on this pattern.')); return box; }
    var ul = el('ul');
    list.forEach(function (e) { ul.appendChild(el('li', null, candTitle(e[0]))); });
    box.appendChild(ul);
    return box;
  }

  // the same stops as a table, for reading without the diagram (and for screen readers)
  function stopTable(p) {
    var d = el('details', { 'class': 'stop-list' });
    d.appendChild(el('summary', null, 'List of the ' + p.stops.length + ' stops'));
    var wrap = el('div', { 'class': 'table-wrap' });
    var t = el('table');
    var head = el('tr');
    ['#', 'stop', 'stop_id', 'verdict', 'along', 'gap before', 'gap after', 'boardings/day', 'alightings/day', 'removing it, passenger-min/day' + assumedTag(p.demand), 'optimiser\u2019s plan', 'candidate'].forEach(function (h, i) {
      head.appendChild(el('th', i === 0 || (i >= 4 && i <= 9) ? { scope: 'col', 'class': 'num' } : { scope: 'col' }, h));
    });
    var dropped = dropSet(p), candAt = {};
    candsOf(p).forEach(function (e) { if (e[0].action === 'remove' && e[1] >= 0) candAt[e[1]] = '#' + e[0].rank + ' remove'; });
    var thead = el('thead');
    thead.appendChild(head);
    t.appendChild(thead);
    var tb = el('tbody');
    p.stops.forEach(function (st, i) {
      var prev = p.stops[i - 1], next = p.stops[i + 1];
      var cells = [i + 1, st[2], st[1], st[6] + ' ' + VERDICT_TEXT[st[6]] + (st[7] ? ' (' + st[7] + ')' : '') + (st[8] && st[7] !== 'timepoint' ? ', timepoint' : ''),
        len(st[5]), prev ? len(st[5] - prev[5]) : '–', next ? len(next[5] - st[5]) : '–', num(st[10]), num(st[11]), signed(st[9], 1),
        dropped[i] ? 'drops' : 'keeps', candAt[i] || ''];
      var tr = el('tr');
      cells.forEach(function (c, j) { tr.appendChild(el('td', j === 0 || (j >= 4 && j <= 9) ? { 'class': 'num' } : null, c)); });
      tb.appendChild(tr);
    });
    t.appendChild(tb);
    wrap.appendChild(t);
    d.appendChild(wrap);
    return d;
  }

  // ---- pattern sections: made in chunks, as the list is scrolled, filtered or linked to ----
  var SECTION_CHUNK = 200;
  var SECTION_ORDER = D.patterns.slice().sort(function (a, b) { return b.lost - a.lost; });
  var sections = {}; // pattern id -> its section, made once and kept (open, drawn) across filters
  var listed = { list: SECTION_ORDER, shown: 0 };
  var sectionHost = document.getElementById('pattern-sections');
  var sectionMore = el('button', { type: 'button', 'class': 'show-more' });
  sectionHost.parentNode.insertBefore(sectionMore, sectionHost.nextSibling);
  var findInput = document.getElementById('pat-find'), findCount = document.getElementById('pat-find-count');
  function sectionOf(p) {
    if (sections[p.id]) return sections[p.id];
    var d = el('details', { 'class': 'pattern', id: 'p-' + p.id });
    var sum = el('summary');
    sum.appendChild(document.createTextNode(patternLabel(p) + ' '));
    sum.appendChild(el('span', { 'class': 's' }, '· ' + p.stops.length + ' stops · ' + p.close + ' close · ' + p.wide + ' wide · ' + (p.cands || []).length + ' candidates · ' + num(p.lost) + ' passenger-min lost/day' + assumedTag(p.demand)));
    d.appendChild(sum);
    var body = el('div', { 'class': 'body' });
    d.appendChild(body);
    d.addEventListener('toggle', function () {
      if (d.open && !body.firstChild) patternBody(p, body);
    });
    return (sections[p.id] = d);
  }
  function showSections(n) {
    var list = listed.list;
    n = Math.min(n, list.length);
    var frag = document.createDocumentFragment();
    for (var i = listed.shown; i < n; i++) frag.appendChild(sectionOf(list[i]));
    sectionHost.appendChild(frag);
    listed.shown = n;
    var rest = list.length - n;
    sectionMore.hidden = rest <= 0;
    sectionMore.textContent = 'Show ' + Math.min(SECTION_CHUNK, rest) + ' more patterns (' + rest + ' not shown)';
    findCount.textContent = 'Showing ' + n + ' of ' + list.length + ' matching patterns (' + D.patterns.length + ' in all).';
  }
  function matchPatterns(text) {
    var q = text.trim().toLowerCase();
    if (!q) return SECTION_ORDER;
    // a route's name or id typed in full means that route alone (so route 1 does not bring 10 and 101)
    var exact = SECTION_ORDER.filter(function (p) { return p.routeName.toLowerCase() === q || p.route.toLowerCase() === q; });
    if (exact.length) return exact;
    return SECTION_ORDER.filter(function (p) { return (p.routeName + ' ' + p.route + ' ' + p.headsign + ' ' + p.id).toLowerCase().indexOf(q) >= 0; });
  }
  function filterSections() {
    listed.list = matchPatterns(findInput.value);
    listed.shown = 0;
    sectionHost.textContent = '';
    showSections(SECTION_CHUNK);
  }
  // a pattern's section, put in the list first when it is not there yet (clearing a filter that hides it)
  function revealSection(id) {
    var p = PATTERN_BY_ID[id];
    if (!p) return null;
    var at = listed.list.indexOf(p);
    if (at < 0) {
      findInput.value = '';
      filterSections();
      at = listed.list.indexOf(p);
    }
    if (at >= listed.shown) showSections(at + 1);
    return sectionOf(p);
  }
  // open a pattern's section (drawing its map) and bring it into view
  function openPattern(id) {
    var d = revealSection(id);
    if (!d) return false;
    d.open = true;
    d.scrollIntoView();
    d.querySelector('summary').focus();
    return true;
  }
  function buildPatternSections() {
    sectionMore.addEventListener('click', function () { showSections(listed.shown + SECTION_CHUNK); });
    findInput.addEventListener('input', filterSections);
    // scrolling near the end of the list brings the next chunk; the button stays for keyboards
    if (typeof IntersectionObserver === 'function') {
      new IntersectionObserver(function (entries) {
        if (entries.some(function (e) { return e.isIntersecting; }) && !sectionMore.hidden) showSections(listed.shown + SECTION_CHUNK);
      }, { rootMargin: '400px 0px' }).observe(sectionMore);
    }
    showSections(SECTION_CHUNK);
    buildRouteIndex();
  }
  // the index of routes, its links drawn when first opened: each route's link lists its patterns alone
  function buildRouteIndex() {
    var box = el('details', { 'class': 'route-index' });
    box.appendChild(el('summary', null, 'Index of routes (' + routeList().length + ')'));
    box.appendChild(el('nav', { 'aria-label': 'Routes' }));
    document.getElementById('route-index').appendChild(box);
    box.addEventListener('toggle', function () {
      if (!box.open || box.querySelector('ul')) return;
      var count = {}, first = {}, nameUsers = {};
      SECTION_ORDER.forEach(function (p) {
        count[p.route] = (count[p.route] || 0) + 1;
        if (!first[p.route]) first[p.route] = p;
      });
      Object.keys(first).forEach(function (r) { var k = first[r].routeName.toLowerCase(); nameUsers[k] = (nameUsers[k] || 0) + 1; });
      var ul = el('ul');
      routeList().forEach(function (r) {
        var li = el('li');
        var a = el('a', { href: '#p-' + first[r[0]].id }, r[1]);
        a.addEventListener('click', function (ev) {
          ev.preventDefault();
          var name = ROUTE_NAME[r[0]];
          findInput.value = nameUsers[name.toLowerCase()] === 1 ? name : r[0];
          filterSections();
          var d = sectionHost.firstChild;
          if (d) { d.scrollIntoView(); d.querySelector('summary').focus(); }
        });
        li.appendChild(a);
        li.appendChild(el('span', { 'class': 's' }, ' ' + count[r[0]]));
        ul.appendChild(li);
      });
      box.querySelector('nav').appendChild(ul);
    });
  }

  // ---- cost curve for a chosen pattern ----
  function drawCurve(p) {
    var host = document.getElementById('curve-host');
    host.textContent = '';
    var W = 760, H = 290, L = 58, R = 18, T = 22, B = 46;
    // show the curve up to a little beyond the optimum, today's spacing and the band, so the flat bottom is not squeezed
    var reach = Math.max(p.opt * 3, p.mean * 1.6, p.hi * 1.8);
    var pts = p.curve.filter(function (q) { return q[0] <= reach; });
    if (pts.length < 2) pts = p.curve;
    if (!pts.length) { host.appendChild(el('p', { 'class': 'note' }, 'No cost curve for this pattern.')); return; }
    var xs = pts.map(function (q) { return q[0]; }), ys = pts.map(function (q) { return q[1] / 60; });
    var x0 = Math.min.apply(null, xs), x1 = Math.max.apply(null, xs);
    var y0 = Math.min.apply(null, ys), y1 = Math.max.apply(null, ys);
    y0 = Math.max(0, y0 - (y1 - y0) * 0.15);
    function X(m) { return L + (Math.min(Math.max(m, x0), x1) - x0) / (x1 - x0 || 1) * (W - L - R); }
    function Y(min) { return T + (1 - (min - y0) / (y1 - y0 || 1)) * (H - T - B); }
    var s = sv('svg', { 'class': 'chart', viewBox: '0 0 ' + W + ' ' + H, role: 'img', 'aria-label': 'Riders\u2019 total time per rider against stop spacing for ' + patternLabel(p) });
    s.appendChild(sv('rect', { 'class': 'band', x: X(p.lo), y: T, width: Math.max(0, X(p.hi) - X(p.lo)), height: H - T - B }));
    s.appendChild(sv('text', { 'class': 'band-label', x: (X(p.lo) + X(p.hi)) / 2, y: T - 6, 'text-anchor': 'middle' }, 'near-optimal band'));
    s.appendChild(sv('path', { 'class': 'curve', d: pts.map(function (q, i) { return (i ? 'L' : 'M') + X(q[0]).toFixed(1) + ' ' + Y(q[1] / 60).toFixed(1); }).join('') }));
    s.appendChild(sv('line', { 'class': 'opt-line', x1: X(p.opt), x2: X(p.opt), y1: T, y2: H - B }));
    s.appendChild(sv('circle', { cx: X(p.opt), cy: Y(p.optCost / 60), r: 5, fill: '#4a6b3f' }));
    s.appendChild(sv('text', { 'class': 'marker-label', x: X(p.opt) + 7, y: Y(p.optCost / 60) + 16 }, 'optimum ' + len(p.opt) + ', ' + num(p.optCost / 60, 2) + ' min'));
    s.appendChild(sv('line', { 'class': 'median-line', x1: X(p.mean), x2: X(p.mean), y1: T, y2: H - B }));
    s.appendChild(sv('rect', { x: X(p.mean) - 5, y: Y(p.curCost / 60) - 5, width: 10, height: 10, fill: '#1e2a31' }));
    s.appendChild(sv('text', { 'class': 'marker-label', x: X(p.mean) + 8, y: Y(p.curCost / 60) - 8 }, 'today (mean gap) ' + len(p.mean) + ', ' + num(p.curCost / 60, 2) + ' min'));
    s.appendChild(sv('line', { 'class': 'axis', x1: L, x2: W - R, y1: H - B, y2: H - B }));
    s.appendChild(sv('line', { 'class': 'axis', x1: L, x2: L, y1: T, y2: H - B }));
    var stepU = niceStep(toUnit(x1) - toUnit(x0), 7), stepM = IMP ? stepU * 0.3048 : stepU;
    for (var m = Math.ceil(x0 / stepM) * stepM; m <= x1 + 1e-6; m += stepM) {
      s.appendChild(sv('text', { 'class': 'tick', x: X(m), y: H - B + 16, 'text-anchor': 'middle' }, num(toUnit(m), stepU < 1 ? 1 : 0)));
      s.appendChild(sv('line', { 'class': 'axis', x1: X(m), x2: X(m), y1: H - B, y2: H - B + 4 }));
    }
    var yDigits = decimalsFor((y1 - y0) / 4);
    for (var i = 0; i <= 4; i++) {
      var v = y0 + (y1 - y0) * i / 4;
      s.appendChild(sv('text', { 'class': 'tick', x: L - 6, y: Y(v) + 4, 'text-anchor': 'end' }, num(v, yDigits)));
    }
    s.appendChild(sv('text', { 'class': 'axis-label', x: (L + W - R) / 2, y: H - 8, 'text-anchor': 'middle' }, 'stop spacing (' + lenUnit() + ')'));
    s.appendChild(sv('text', { 'class': 'axis-label', transform: 'translate(14 ' + ((T + H - B) / 2) + ') rotate(-90)', 'text-anchor': 'middle' }, 'minutes per rider (walk weighted + stops)'));
    host.appendChild(s);
    var pct = p.curCost > 0 ? (1 - p.optCost / p.curCost) * 100 : 0;
    host.appendChild(el('p', { 'class': 'note' }, 'At today\u2019s mean gap of ' + len(p.mean) + ' a rider on ' + patternLabel(p) + ' spends ' + num(p.curCost / 60, 2) + ' min walking (weighted) and waiting through stops; at the optimum of ' + len(p.opt) + ' it would be ' + num(p.optCost / 60, 2) + ' min (' + num(pct, 1) + ' % less). Anywhere in the shaded band the cost is within the tolerance of the optimum: the bottom of the curve is flat.' + assumedTag(p.demand)));
  }
  function buildCurveChooser() {
    var sel = document.getElementById('curve-pattern');
    var order = D.patterns.slice().sort(function (a, b) { return b.lost - a.lost; });
    order.forEach(function (p) { sel.appendChild(el('option', { value: p.id }, patternLabel(p))); });
    var byId = {};
    D.patterns.forEach(function (p) { byId[p.id] = p; });
    sel.addEventListener('change', function () { drawCurve(byId[sel.value]); });
    if (order.length) drawCurve(order[0]);
  }

  // ---- sortable, filterable tables ----
  function makeTable(cfg) {
    var table = document.getElementById(cfg.tableId);
    var tbody = table.querySelector('tbody');
    var count = document.getElementById(cfg.countId);
    var state = { key: cfg.defaultKey, dir: cfg.defaultDir };
    var ths = table.querySelectorAll('thead th');
    // a long table shows cfg.limit rows at a time; "show more" adds as many again (nothing is cut off)
    var limit = cfg.limit;
    var more = el('button', { type: 'button', 'class': 'show-more' });
    table.parentNode.parentNode.insertBefore(more, table.parentNode.nextSibling);
    more.addEventListener('click', function () { limit += cfg.limit; render(); });
    function render() {
      var rows = cfg.rows.filter(cfg.filter);
      var col = cfg.columns.filter(function (c) { return c.key === state.key; })[0];
      rows.sort(function (a, b) {
        var va = col.value(a), vb = col.value(b), r;
        if (typeof va === 'number' && typeof vb === 'number') r = va - vb;
        else r = COLLATE.compare(String(va), String(vb));
        return state.dir === 'asc' ? r : -r;
      });
      tbody.textContent = '';
      var shown = rows.slice(0, limit);
      shown.forEach(function (r) {
        var tr = el('tr');
        cfg.columns.forEach(function (c) {
          var td = el('td', c.num ? { 'class': 'num' } : null);
          var out = c.cell ? c.cell(r, td) : c.value(r);
          if (out !== undefined) td.textContent = String(out);
          tr.appendChild(td);
        });
        tbody.appendChild(tr);
      });
      count.textContent = 'Showing ' + shown.length + ' of ' + rows.length + ' matching (' + cfg.rows.length + ' in all).';
      var rest = rows.length - shown.length;
      more.hidden = rest <= 0;
      more.textContent = 'Show ' + Math.min(cfg.limit, rest) + ' more (' + rest + ' not shown)';
      for (var i = 0; i < ths.length; i++) {
        var k = ths[i].getAttribute('data-key');
        if (k === state.key) ths[i].setAttribute('aria-sort', state.dir === 'asc' ? 'ascending' : 'descending');
        else ths[i].removeAttribute('aria-sort');
      }
    }
    for (var i = 0; i < ths.length; i++) (function (th) {
      var b = th.querySelector('button');
      b.addEventListener('click', function () {
        var k = th.getAttribute('data-key');
        if (state.key === k) state.dir = state.dir === 'asc' ? 'desc' : 'asc';
        else { state.key = k; state.dir = th.classList.contains('num') ? 'desc' : 'asc'; }
        render();
      });
    })(ths[i]);
    cfg.inputs.forEach(function (id) {
      var inp = document.getElementById(id);
      inp.addEventListener(inp.tagName === 'INPUT' && inp.type !== 'checkbox' ? 'input' : 'change', render);
    });
    render();
  }
  // a link to a pattern's section that opens it (drawing its map) and brings it into view
  function patternLink(id, text, cls) {
    var a = el('a', cls ? { href: '#p-' + id, 'class': cls } : { href: '#p-' + id }, text);
    a.addEventListener('click', function (ev) { if (openPattern(id)) ev.preventDefault(); });
    return a;
  }
  function fillRouteSelect(id, routes) {
    var sel = document.getElementById(id);
    routes.forEach(function (r) { sel.appendChild(el('option', { value: r[0] }, r[1])); });
  }
  var ROUTES = null;
  function routeList() {
    if (ROUTES) return ROUTES;
    var seen = {}, out = [];
    D.patterns.forEach(function (p) { if (!seen[p.route]) { seen[p.route] = 1; out.push([p.route, p.routeName === p.route ? p.route : p.routeName + ' (' + p.route + ')']); } });
    return (ROUTES = out.sort(function (a, b) { return COLLATE.compare(a[1], b[1]); }));
  }

  function buildCandidates() {
    fillRouteSelect('cand-route', routeList());
    var routeSel = document.getElementById('cand-route'), actSel = document.getElementById('cand-action');
    var robust = document.getElementById('cand-robust'), q = document.getElementById('cand-search');
    makeTable({
      tableId: 'cand-table', countId: 'cand-count', rows: D.candidates, limit: 400, defaultKey: 'net', defaultDir: 'asc',
      inputs: ['cand-route', 'cand-action', 'cand-robust', 'cand-search'],
      filter: function (c) {
        if (routeSel.value && c.routes.indexOf(routeSel.value) < 0) return false;
        if (actSel.value && c.action !== actSel.value) return false;
        if (robust.checked && !c.robust) return false;
        var t = q.value.trim().toLowerCase();
        if (t && (c.name + ' ' + c.id).toLowerCase().indexOf(t) < 0) return false;
        return true;
      },
      columns: [
        { key: 'rank', num: true, value: function (c) { return c.rank; } },
        { key: 'action', value: function (c) { return c.action; } },
        { key: 'stop', value: function (c) { return c.name + (c.id ? ' (' + c.id + ')' : ''); }, cell: function (c, td) {
          td.textContent = c.name + (c.id ? ' (' + c.id + ')' : '') + ' ';
          if (c.pats && c.pats.length) td.appendChild(patternLink(D.patterns[c.pats[0]].id, c.pats.length > 1 ? 'pattern (1 of ' + c.pats.length + ')' : 'pattern', 'pat-link'));
        } },
        { key: 'routes', value: function (c) { return c.routeNames.join(', '); } },
        { key: 'net', num: true, value: function (c) { return c.net; }, cell: function (c, td) { td.className = 'num ' + (c.net < 0 ? 'neg' : 'pos'); return signed(c.net, 1); } },
        { key: 'riders', num: true, value: function (c) { return c.riders; }, cell: function (c) { return num(c.riders); } },
        { key: 'rt', num: true, value: function (c) { return c.rt; }, cell: function (c) { return signed(c.rt, 1); } },
        { key: 'vh', num: true, value: function (c) { return c.vh; }, cell: function (c) { return signed(c.vh, 2); } },
        { key: 'robust', value: function (c) { return c.robust ? 'yes' : 'no'; } },
      ],
    });
  }
  function buildPatterns() {
    fillRouteSelect('pat-route', routeList());
    var routeSel = document.getElementById('pat-route'), vSel = document.getElementById('pat-verdict');
    makeTable({
      tableId: 'pat-table', countId: 'pat-count', rows: D.patterns, limit: 200, defaultKey: 'lost', defaultDir: 'desc',
      inputs: ['pat-route', 'pat-verdict'],
      filter: function (p) {
        if (routeSel.value && p.route !== routeSel.value) return false;
        var v = vSel.value;
        if (v === 'close' && p.close === 0) return false;
        if (v === 'wide' && p.wide === 0) return false;
        if (v === 'ok' && (p.close > 0 || p.wide > 0)) return false;
        return true;
      },
      columns: [
        { key: 'pattern', value: function (p) { return p.id; }, cell: function (p, td) {
          td.appendChild(patternLink(p.id, p.id)); return undefined; } },
        { key: 'route', value: function (p) { return p.routeName; } },
        { key: 'headsign', value: function (p) { return p.headsign; } },
        { key: 'stops', num: true, value: function (p) { return p.stops.length; } },
        { key: 'length', num: true, value: function (p) { return p.len; }, cell: function (p) { return longLen(p.len); } },
        { key: 'median', num: true, value: function (p) { return p.median; }, cell: function (p) { return len(p.median); } },
        { key: 'opt', num: true, value: function (p) { return p.opt; }, cell: function (p) { return len(p.opt); } },
        { key: 'close', num: true, value: function (p) { return p.close; } },
        { key: 'wide', num: true, value: function (p) { return p.wide; } },
        { key: 'lost', num: true, value: function (p) { return p.lost; }, cell: function (p) { return num(p.lost); } },
      ],
    });
  }

  // Every box that scrolls on its own (tables, strip diagrams, charts on a phone) is a named region a
  // keyboard can reach: tabindex 0 lets arrow keys scroll it, the label names it for screen readers.
  var REGION_NAMES = {};
  function scrollRegions(root) {
    Array.prototype.forEach.call(root.querySelectorAll('.table-wrap, .strip-wrap, .chart-scroll'), function (w) {
      if (w.hasAttribute('tabindex')) return;
      var sec = w.closest('details.pattern, section');
      var head = sec ? sec.querySelector('summary, h2') : null;
      var what = w.classList.contains('table-wrap') ? 'Table' : 'Chart';
      w.setAttribute('tabindex', '0');
      w.setAttribute('role', 'region');
      var label = what + (head ? ': ' + head.textContent.trim().slice(0, 120) : '');
      // two boxes in one section (the candidates and the gaps to review) get names apart
      REGION_NAMES[label] = (REGION_NAMES[label] || 0) + 1;
      w.setAttribute('aria-label', label + (REGION_NAMES[label] > 1 ? ' ' + REGION_NAMES[label] : '') + ' (scrolls)');
    });
  }
  (function chartScroll() {
    var hist = document.querySelector('#gaps svg.chart');
    if (hist) {
      var box = el('div', { 'class': 'chart-scroll' });
      hist.parentNode.insertBefore(box, hist);
      box.appendChild(hist);
    }
    var curve = document.getElementById('curve-host');
    if (curve) curve.classList.add('chart-scroll');
  })();

  // a table of contents: a link to each part of the page
  (function contents() {
    var nav = el('nav', { 'class': 'toc', 'aria-label': 'Contents' });
    Array.prototype.forEach.call(document.querySelectorAll('main > section[id] > h2'), function (h) {
      nav.appendChild(el('a', { href: '#' + h.parentNode.id }, h.textContent));
    });
    var main = document.querySelector('main');
    main.insertBefore(nav, main.firstChild);
  })();
  buildCurveChooser();
  buildCandidates();
  buildPatterns();
  buildPatternSections();
  scrollRegions(document);
  // a link from elsewhere to one pattern's section (#p-ID) opens it, whether or not its chunk was made
  function openFromHash() {
    if (location.hash.indexOf('#p-') !== 0) return;
    var id = location.hash.slice(3);
    try { id = decodeURIComponent(id); } catch (e) { /* an id with a bare % stays as written */ }
    openPattern(id);
  }
  window.addEventListener('hashchange', openFromHash);
  openFromHash();
  document.documentElement.setAttribute('data-ready', '1');
})();
`;
