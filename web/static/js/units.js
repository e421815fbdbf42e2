// Units people use. The scenario, its file and its link keep SI and the
// file's sign convention (a range rate is positive when the range grows:
// opening); the page shows and accepts ranges, speeds, heights and range
// rates in the units chosen here, remembered per browser.
//
// Definitions (exact):
//   1 nmi = 1852 m: International Hydrographic Conference, Monaco 1929;
//     BIPM, The International System of Units (SI Brochure, 9th ed. 2019),
//     Table 8 (non-SI units).
//   1 kt = 1 nmi/h = 1852/3600 m/s: same sources.
//   1 km/h = 1000/3600 m/s.
//   1 ft = 0.3048 m: international yard and pound agreement, 1959.
//
// Quantities: 'range' (m, km, nmi), 'speed' (an unsigned speed: m/s,
// km/h, kt), 'rate' (a range rate: a speed with a sign, in the chosen
// convention) and 'height' (m, ft).

const StoreKey = 'pulsewright.units';

// Each unit is an exact ratio: one unit is num/den SI units.
const table = {
  range: { m: [1n, 1n], km: [1000n, 1n], nmi: [1852n, 1n] },
  speed: { 'm/s': [1n, 1n], 'km/h': [1000n, 3600n], kt: [1852n, 3600n] },
  height: { m: [1n, 1n], ft: [3048n, 10000n] },
};
// Other names a typed value may carry after its number ("12 NM").
const aliases = {
  range: { m: 'm', km: 'km', nmi: 'nmi', NM: 'nmi' },
  speed: { 'm/s': 'm/s', 'km/h': 'km/h', kt: 'kt', kn: 'kt', knots: 'kt' },
  height: { m: 'm', ft: 'ft' },
};

export const rangeUnits = Object.keys(table.range);
export const speedUnits = Object.keys(table.speed);
export const heightUnits = Object.keys(table.height);
// Range-rate sign conventions: 'opening' (positive when the range grows,
// the file's convention) or 'closing' (positive when it shrinks).
export const conventions = ['opening', 'closing'];
export const FileConvention = 'opening';

export const defaults = Object.freeze({ range: 'm', speed: 'm/s', height: 'm', rate: 'opening' });

// check returns a whole, valid set of preferences from p, or throws an
// Error naming the field, its value and the valid choices.
export function check(p) {
  const out = { ...defaults };
  for (const [key, choices] of [['range', rangeUnits], ['speed', speedUnits], ['height', heightUnits], ['rate', conventions]]) {
    if (p[key] === undefined) continue;
    if (!choices.includes(p[key])) throw new Error(`${key} unit “${p[key]}” is not one of ${choices.join(', ')}`);
    out[key] = p[key];
  }
  return out;
}

function load() {
  try {
    const raw = localStorage.getItem(StoreKey);
    return raw ? check(JSON.parse(raw)) : { ...defaults };
  } catch {
    return { ...defaults }; // a stored value from elsewhere: start from SI
  }
}

let prefs = load();
const listeners = new Set();

// units returns the current preferences {range, speed, height, rate}.
export function units() {
  return { ...prefs };
}

// setUnits changes some preferences, stores them and tells the listeners.
// An invalid choice throws and changes nothing.
export function setUnits(p) {
  const next = check({ ...prefs, ...p });
  prefs = next;
  try {
    localStorage.setItem(StoreKey, JSON.stringify(prefs));
  } catch { /* private mode: the choice lasts for this page */ }
  for (const fn of listeners) fn(units());
}

// onUnits calls fn with the new preferences whenever they change.
export function onUnits(fn) {
  listeners.add(fn);
  return () => listeners.delete(fn);
}

const ratio = (q, p) => {
  const kind = q === 'rate' ? 'speed' : q;
  const t = table[kind];
  if (!t) throw new Error(`units: unknown quantity ${q}`);
  return t[p[kind]];
};
// sign is −1 for a range rate shown closing-positive.
const sign = (q, p) => (q === 'rate' && p.rate === 'closing' ? -1 : 1);

// unit returns the unit symbol of quantity q ("nmi", "kt").
export function unit(q, p = prefs) {
  return p[q === 'rate' ? 'speed' : q];
}

// unitLabel is the unit as a heading shows it: a range rate adds its
// convention ("kt, closing +").
export function unitLabel(q, p = prefs) {
  return q === 'rate' ? `${unit(q, p)}, ${p.rate} +` : unit(q, p);
}

// toUser converts an SI value (file convention) to the user's unit and
// convention; NaN and ±Inf pass through.
export function toUser(q, si, p = prefs) {
  const [num, den] = ratio(q, p);
  return (sign(q, p) * si * Number(den)) / Number(num);
}

// fromUser converts a value in the user's unit and convention to SI.
export function fromUser(q, v, p = prefs) {
  const [num, den] = ratio(q, p);
  return (sign(q, p) * v * Number(num)) / Number(den);
}

const numberText = /^([+-]?)(\d+(?:\.\d*)?|\.\d+)(?:[eE]([+-]?\d+))?$/;

// exactSI is the double nearest to the decimal text (sign, digits,
// exponent) times num/den, computed in integers so that no rounding
// happens before the last step: "12.3" nmi is the double nearest to
// 22779.6 m, not 12.3 × 1852 in floating point.
function exactSI(neg, digits, exp, num, den) {
  const [int, frac = ''] = digits.split('.');
  let mant = BigInt((int || '0') + frac) * num;
  let e = exp - frac.length;
  if (mant === 0n) return neg ? -0 : 0;
  // 25 significant digits of mant/den, then one correctly rounded parse.
  const scale = Math.max(0, 25 - (mant.toString().length - den.toString().length));
  mant = (mant * 10n ** BigInt(scale)) / den;
  e -= scale;
  return Number(`${neg ? '-' : ''}${mant}e${e}`);
}

// parse reads text typed for quantity q: undefined for empty text, NaN
// for text that is not a number, else the SI value (file convention). The
// number may carry one of the quantity's units ("12 km" in a field shown
// in nmi); without one it is in the user's unit.
export function parse(q, text, p = prefs) {
  const kind = q === 'rate' ? 'speed' : q;
  let s = String(text).trim().replace(',', '.').replace(/^\u2212/, '-');
  if (s === '') return undefined;
  let u = unit(q, p);
  const m = /^(.*?\d\.?)\s*([A-Za-z/]+)$/.exec(s);
  if (m) {
    const named = aliases[kind][m[2]];
    if (!named) return NaN; // "12x", "1e"
    u = named;
    s = m[1];
  }
  const n = numberText.exec(s);
  if (!n) return NaN;
  const [num, den] = table[kind][u];
  const v = exactSI(n[1] === '-', n[2], Number(n[3] || 0), num, den);
  if (!Number.isFinite(v)) return NaN;
  return sign(q, p) * v === 0 ? 0 : sign(q, p) * v;
}

// qtyOf is the quantity of an editor field that does not name one: a
// field in metres whose key ends in "height_m" (radar.antenna_height_m, a
// target's height_m) is a height, so such fields follow the units without
// a change to their schema entry; other fields none.
export function qtyOf(key, unitText) {
  return unitText === 'm' && /(^|_)height_m$/.test(key || '') ? 'height' : '';
}

// notValue is the message for text that parse refused.
export function notValue(q, text, p = prefs) {
  const kind = q === 'rate' ? 'speed' : q;
  return `“${String(text).trim()}” is not a number in ${unit(q, p)} (a unit may follow it: ${Object.keys(table[kind]).join(', ')})`;
}

// fieldText is an SI value as an editor field shows it: the user's unit,
// up to `digits` significant digits (12: a value typed in that unit
// reads back as typed), no unit symbol.
export function fieldText(q, si, digits = 12, p = prefs) {
  if (si === undefined || si === null || si === '') return '';
  if (typeof si !== 'number') return String(si);
  const v = toUser(q, si, p);
  return Number.isFinite(v) ? String(Number(v.toPrecision(digits)) || 0) : '';
}

// digits is how many decimals a value of quantity q in unit u needs to
// keep the precision `decimals` would give it in SI (m or m/s).
function digitsFor(q, u, decimals) {
  const extra = { km: 3, nmi: 4 }[u] || 0; // 1e-4 nmi is 0.19 m; km/h, kt and ft are finer than m/s and m
  return Math.max(0, decimals + extra);
}

// number formats an SI value in the user's unit with as many decimals as
// `decimals` metres (or m/s) would have, with no unit; '—' when it is not
// a finite number. A signed range rate carries its sign.
export function number(q, si, decimals = 1, p = prefs) {
  if (typeof si !== 'number' || !Number.isFinite(si)) return '—';
  const v = toUser(q, si, p);
  const t = v.toFixed(digitsFor(q, unit(q, p), decimals));
  return /^-0(\.0*)?$/.test(t) ? t.slice(1) : t;
}

// format is number with the unit ("12.5000 nmi", "−9.7 kt").
export function format(q, si, decimals = 1, p = prefs) {
  const n = number(q, si, decimals, p);
  return n === '—' ? n : `${n} ${unit(q, p)}`;
}

// signed is a range rate in the user's unit and convention with an
// explicit sign ("+9.7 kt").
export function signed(si, decimals = 1, p = prefs) {
  const n = number('rate', si, decimals, p);
  if (n === '—') return n;
  return `${n.startsWith('-') || Number(n) === 0 ? n : `+${n}`} ${unit('rate', p)}`;
}

// tick formats an axis value (SI) compactly in the user's unit: at most
// 4 significant digits past the integer part.
export function tick(q, si, p = prefs) {
  if (typeof si !== 'number' || !Number.isFinite(si)) return '';
  const v = toUser(q, si, p);
  const a = Math.abs(v);
  const t = a >= 1000 ? v.toFixed(0) : String(Number(v.toPrecision(4)));
  return t === '-0' ? '0' : t;
}

// --- text written by the server ---

// A number followed by a unit in a sentence the server wrote in SI: a
// range or distance in m or km, a speed in m/s. A range rate is written
// with an explicit sign ("%+.1f m/s"); an unsigned speed (a spread, a
// blind speed) has none. "±" and "m/s rms" keep their meaning.
const siInText = /(?<![\w.])([+\-\u2212±]?)(?:(\d+(?:\.\d+)?)–)?(\d+(?:\.\d+)?(?:e[+-]?\d+)?) ?(km|m\/s|m)(?![\w/²³])/g; // "1000–2000 m": one unit for both ends

// The values of the scenario the person typed (SI, file convention):
// ranges, range rates, heights. restate reads a number back as the
// typed value the server rounded it from (scenarios.RestateTyped).
let typedSource = () => null;

// typedFrom names where restate finds the current scenario.
export function typedFrom(get) { typedSource = get; }

// typedIn lists a scenario's typed ranges (targets' ranges and edges,
// the receive window), range rates and heights (targets', the antenna's).
export function typedIn(s) {
  const t = { range: [], rate: [], height: [] };
  if (!s || typeof s !== 'object') return t;
  const r = s.radar || {};
  t.range.push(r.window_start_m, r.window_stop_m);
  t.height.push(r.antenna_height_m);
  for (const g of s.targets || []) {
    t.range.push(g.range_m, g.range_start_m, g.range_stop_m);
    t.rate.push(g.range_rate_mps);
    t.height.push(g.height_m);
  }
  for (const k of Object.keys(t)) t[k] = t[k].filter((x) => typeof x === 'number' && Number.isFinite(x) && x !== 0);
  return t;
}

// snap is the value of vals nearest to v that the server's rounding
// could have written as v (within half the resolution res), or undefined.
function snap(vals, v, res, abs) {
  let best;
  for (let x of vals || []) {
    if (abs) x = Math.abs(x);
    if (x === 0 || Math.abs(x - v) > (res / 2) * (1 + 1e-9)) continue;
    if (best === undefined || Math.abs(x - v) < Math.abs(best - v)) best = x;
  }
  return best;
}

// resolution is the step of the last digit of a number as the server
// wrote it ("18518.15" → 0.01).
function resolution(digits) {
  const [mant, exp = '0'] = digits.split('e');
  return 10 ** (Number(exp) - (mant.split('.')[1] || '').length);
}

// readBack is the typed value v was rounded from, in the user's unit as
// a field shows it ("9999", "12.5"), when it has no more decimals than
// the ordinary restatement would give; else undefined (25 m/s typed is
// 48.596112311 kt and reads "48.6 kt").
function readBack(q, vals, v, res, abs, decimals, p) {
  const x = snap(vals, v, res, abs);
  if (x === undefined) return undefined;
  const t = String(Number(toUser(q, x, p).toPrecision(12)) || 0);
  return (t.split('.')[1] || '').length > digitsFor(q, unit(q, p), decimals) ? undefined : t;
}

// restate rewrites the SI numbers of a sentence written by the server
// in the user's units; it returns the text unchanged when the user's
// units are SI. A height ("914 m high") takes the height unit. A value
// of typed (default: the current scenario's) reads back as typed: with
// nmi, a target typed as 9999 nmi that the server wrote "18518.15 km"
// reads "9999 nmi", not "9999.0011 nmi".
export function restate(text, p = prefs, typed = typedIn(typedSource())) {
  if (typeof text !== 'string' || (p.range === 'm' && p.speed === 'm/s' && p.rate === FileConvention && p.height === 'm')) return text;
  return text.replace(siInText, (all, sg, from, digits, u, at, whole) => {
    const decimals = (digits.split('e')[0].split('.')[1] || '').length;
    if (from !== undefined) { // a span: both ends in the range unit
      if (u === 'm/s' || p.range === 'm') return all;
      const k = u === 'km' ? 1000 : 1;
      const d = u === 'km' ? Math.max(0, decimals - 3) : decimals;
      const side = (t) => readBack('range', typed.range, Number(t) * k, resolution(t) * k, false, d, p) ?? number('range', Number(t) * k, d, p);
      return `${sg}${side(from)}–${side(digits)} ${unit('range', p)}`;
    }
    let v = Number(digits);
    const res = resolution(digits);
    if (u === 'm/s') {
      if (p.speed === 'm/s' && p.rate === FileConvention) return all;
      if (sg === '+' || sg === '-' || sg === '\u2212') {
        v *= sg === '+' ? 1 : -1;
        const t = readBack('rate', typed.rate, v, res, false, decimals, p);
        if (t === undefined) return signed(v, decimals, p);
        return `${t.startsWith('-') ? t : `+${t}`} ${unit('rate', p)}`;
      }
      const t = readBack('speed', typed.rate, v, res, true, decimals, p);
      return t === undefined ? `${sg}${format('speed', v, decimals, p)}` : `${sg}${t} ${unit('speed', p)}`;
    }
    if (u === 'm' && whole.startsWith(' high', at + all.length)) {
      if (p.height === 'm') return all;
      const t = readBack('height', typed.height, v, res, false, decimals, p);
      return t === undefined ? `${sg}${format('height', v, decimals, p)}` : `${sg}${t} ${unit('height', p)}`;
    }
    if (p.range === 'm') return all; // the server's own choice between m and km stays
    const k = u === 'km' ? 1000 : 1;
    const d = u === 'km' ? Math.max(0, decimals - 3) : decimals;
    const t = readBack('range', typed.range, v * k, res * k, false, d, p);
    return t === undefined ? `${sg}${format('range', v * k, d, p)}` : `${sg}${t} ${unit('range', p)}`;
  });
}

// --- range errors from the server ---

// The server states a field's range error in SI ("4e+11 is above the
// maximum 3e+11 …"); rangeError restates it in the field's unit and
// convention, where a closing-positive rate swaps above and below.
const rangeMessage = /^(-?[\d.]+(?:e[+-]?\d+)?) (is above the maximum|is below the minimum|must be above) (-?[\d.]+(?:e[+-]?\d+)?)(.*)$/;
// exact, when given, is the field's value in SI: the message's own copy
// has 6 significant digits, which in another unit would read 99998.9 nmi
// for the 99999 typed.
export function rangeError(q, msg, exact, p = prefs) {
  const m = rangeMessage.exec(msg);
  if (!m) return restate(msg, p);
  const show = (x) => `${tidy(toUser(q, Number(x), p))} ${unit(q, p)}`;
  const value = typeof exact === 'number' && Math.abs(exact - Number(m[1])) <= 1e-5 * Math.abs(exact)
    ? `${Number(toUser(q, exact, p).toPrecision(12))} ${unit(q, p)}` : show(m[1]);
  let words = m[2];
  if (sign(q, p) < 0) {
    words = { 'is above the maximum': 'is below the minimum', 'is below the minimum': 'is above the maximum', 'must be above': 'must be below' }[words];
  }
  // "(valid range lo … hi)": both ends, in ascending order once the
  // sign has turned; "(valid range: above lo, at most hi)" likewise.
  const num = '(-?[\\d.]+(?:e[+-]?\\d+)?)';
  let rest = m[4].replace(new RegExp(`valid range ${num} … ${num}`), (_, a, b) => {
    const [x, y] = [toUser(q, Number(a), p), toUser(q, Number(b), p)].sort((i, j) => i - j);
    return `valid range ${tidy(x)} … ${tidy(y)} ${unit(q, p)}`;
  });
  if (sign(q, p) < 0) {
    rest = rest.replace(new RegExp(`above ${num}, at most ${num}`), (_, a, b) => `at least ${show(b)}, below ${show(a)}`);
  } else {
    rest = rest.replace(/(above|below|at most|at least) (-?[\d.]+(?:e[+-]?\d+)?)/g, (_, w, x) => `${w} ${show(x)}`);
  }
  const conv = q === 'rate' && p.rate !== FileConvention ? ` (range rate ${p.rate} positive)` : '';
  return `${value} ${words} ${show(m[3])}${rest}${conv}`;
}
const tidy = (v) => String(Number(v.toPrecision(6)) || 0);

// --- charts: axes named "… (m)" or "… (m/s)" by the server ---

const axisName = /^(.*) \((m|m\/s)\)$|^(m|m\/s)$/; // "range (m)"; a bare "m" (the Doppler tolerance's range shift)

// axisUnits rewrites, in a chart option about to be applied whole, the
// names, tick labels and pointer labels of its range and range-rate axes
// into the user's units (the data stay in SI). It keeps the server's
// name in `siName`, so that it can be applied again after a change.
export function axisUnits(option, p = prefs) {
  // Plot titles the server wrote ("at 120 m", "at +5.0 m/s"), restated.
  for (const t of [option.title || []].flat()) {
    if (!t || typeof (t.siText || t.text) !== 'string') continue;
    t.siText = t.siText || t.text;
    t.text = restate(t.siText, p);
  }
  for (const ax of [option.xAxis || [], option.yAxis || []].flat()) {
    if (!ax || ax.type !== 'value') continue;
    const name = ax.siName || ax.name;
    const hit = typeof name === 'string' && axisName.exec(name);
    if (!hit) continue;
    const m = hit[3] ? [hit[0], '', hit[3]] : hit;
    const q = m[2] === 'm' ? 'range' : 'rate';
    ax.siName = name;
    ax.unitsQty = q;
    if (!('siShowMin' in ax)) {
      ax.siShowMin = (ax.axisLabel || {}).showMinLabel ?? null;
      ax.siShowMax = (ax.axisLabel || {}).showMaxLabel ?? null;
    }
    // "range rate (kt)" positive opening, as the file; "closing rate (kt)"
    // positive closing.
    const stem = q === 'rate' && p.rate === 'closing' ? m[1].replace(/^range rate$/, 'closing rate') : m[1];
    const u = q === 'rate' && stem === m[1] && p.rate === 'closing' ? unitLabel(q, p) : unit(q, p);
    ax.name = stem ? `${stem} (${u})` : u;
    // Closing positive: the rate axis runs the other way, so that up (or
    // right) is still positive; a heat map's hidden category axis on the
    // same grid turns with it, or its cells would not match the ticks.
    if (q === 'rate') {
      if (!('siInverse' in ax)) ax.siInverse = !!ax.inverse;
      const flip = (sign(q, p) < 0) !== ax.siInverse;
      ax.inverse = flip;
      for (const other of [option.xAxis || [], option.yAxis || []].flat()) {
        if (!other || other.type !== 'category' || (other.gridIndex || 0) !== (ax.gridIndex || 0)) continue;
        if (!sameDim(option, ax, other)) continue;
        if (!('siInverse' in other)) other.siInverse = !!other.inverse;
        other.inverse = (sign(q, p) < 0) !== other.siInverse;
      }
    }
    const f = (v) => tick(q, v, p);
    ax.axisLabel = { ...(ax.axisLabel || {}), formatter: f };
    ax.axisPointer = { ...(ax.axisPointer || {}), label: { ...((ax.axisPointer || {}).label || {}), formatter: (o) => tick(q, o.value, p) } };
  }
  return option;
}

// sameDim reports whether axes a and b are both x axes or both y axes of
// option.
function sameDim(option, a, b) {
  const xs = [option.xAxis || []].flat();
  return xs.includes(a) === xs.includes(b);
}

// axisPatch is the merge that re-applies axisUnits to a drawn chart's
// option (chart.getOption()): only its axes.
export function axisPatch(current, p = prefs) {
  const copy = (list) => [list || []].flat().map((a) => ({ ...a }));
  const o = { title: copy(current.title), xAxis: copy(current.xAxis), yAxis: copy(current.yAxis) };
  axisUnits(o, p);
  return o;
}

// niceValues returns round values of quantity q in the user's unit
// (1, 2 or 5 × 10ⁿ apart, about n of them) between the SI values a and
// b, as SI values.
export function niceValues(q, a, b, n, p = prefs) {
  let lo = toUser(q, a, p);
  let hi = toUser(q, b, p);
  if (lo > hi) [lo, hi] = [hi, lo];
  if (!(hi > lo) || !Number.isFinite(lo) || !Number.isFinite(hi)) return [];
  const raw = (hi - lo) / Math.max(1, n);
  const mag = 10 ** Math.floor(Math.log10(raw));
  // The 1-2-5 step nearest to raw (in ratio), smaller while fewer than
  // three ticks would fit.
  const steps = [0.5, 1, 2, 5, 10].map((k) => k * mag);
  let i = steps.reduce((best, x, j) => (Math.abs(Math.log(x / raw)) < Math.abs(Math.log(steps[best] / raw)) ? j : best), 1);
  const ticks = (step) => {
    const out = [];
    for (let k = Math.ceil(lo / step - 1e-9); k * step <= hi + step * 1e-9 && out.length < 60; k++) out.push(Number((k * step).toPrecision(12)));
    return out;
  };
  let vals = ticks(steps[i]);
  while (vals.length < 3 && i > 0) vals = ticks(steps[--i]);
  return vals.map((v) => fromUser(q, v, p));
}

// niceTicks puts the ticks of a drawn chart's range and range-rate axes
// on round values of the user's unit (the server's ticks are round in
// SI: 5000 m is 2.6998 nmi). It changes the chart only when the ticks
// change (a zoom, a new extent), and not at all in SI units.
export function niceTicks(chart, p = prefs) {
  const model = chart.getModel && chart.getModel();
  if (!model) return;
  const patch = {};
  let changed = false;
  for (const dim of ['xAxis', 'yAxis']) {
    const list = [];
    for (let i = 0; ; i++) {
      const c = model.getComponent(dim, i);
      if (!c) break;
      const q = c.option.unitsQty;
      const [num, den] = q ? ratio(q, p) : [1n, 1n];
      if (!q || !c.axis || num === den) {
        const had = c.option.axisLabel && c.option.axisLabel.customValues;
        list.push(had ? { axisLabel: { customValues: null, showMinLabel: c.option.siShowMin, showMaxLabel: c.option.siShowMax }, axisTick: { customValues: null } } : {});
        changed = changed || !!had;
        continue;
      }
      const [a, b] = c.axis.scale.getExtent();
      const n = c.option.splitNumber || 5;
      const vals = niceValues(q, a, b, n, p);
      const old = (c.option.axisLabel && c.option.axisLabel.customValues) || [];
      if (vals.length === old.length && vals.every((v, k) => v === old[k])) {
        list.push({});
        continue;
      }
      changed = true;
      // Round ticks may sit at the ends too: their labels show.
      list.push({ axisLabel: { customValues: vals, showMinLabel: true, showMaxLabel: true }, axisTick: { customValues: vals } });
    }
    patch[dim] = list;
  }
  if (changed) chart.setOption(patch);
}
