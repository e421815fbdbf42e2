// The plots. Each ECharts instance is created once; frames from the server
// carry the options ({replace, option}) and are applied with setOption.
// The page adds only interaction overlays: the drag guide on the profile
// plot and a hover card built from the report.

import * as echarts from '../vendor/echarts/echarts.esm.min.js';
import { SeriesMarkers } from './protocol.js';
import { FastLayer, Fixed, HeatLayer, layerSeries, tooltipAbove } from './fastlayer.js';
import { keepNamesClear } from './labels.js';
import { axisPatch, axisUnits, format, niceTicks, restate, signed } from './units.js';

const HitPx = 9; // how near the pointer must be to a marker, px
const SecondaryMs = 100; // plots other than the profile redraw at most this often while frames stream
const DragSecondaryMs = 250; // … and this often while a marker is dragged
const WheelGestureMs = 3000; // ms: wheel events this close, with the pointer still, form one gesture
// While frames stream, the profile's and the echo's data are drawn by a
// FastLayer each; the charts themselves take the newest data once no frame
// came for SettleMs (or when a drag ends).
const SettleMs = 150;

const chartMs = {};
window.__pwChartMs = chartMs;
const fastMs = {}; // time per fast-layer drawing, ms, by chart
window.__pwFastMs = fastMs;
// The page's work outside an edit's path to its pixels, for the browser
// tests: name → [[start, ms], …] (performance.now), the last 200 of each.
const work = {};
window.__pwWork = work;
export function worked(name, t0) {
  const w = (work[name] = work[name] || []);
  w.push([t0, performance.now() - t0]);
  if (w.length > 200) w.shift();
}

// Tooltips are drawn in the canvas (renderMode 'richText': an HTML
// tooltip would need inline styles, which the CSP refuses). Text from the
// scenario loses braces, which rich text would read as markup, and long
// lines are wrapped by hand.
const plain = (v) => String(v).replace(/[{}]/g, '');
const wrap = (text, width = 52) => {
  const lines = [];
  let line = '';
  for (const w of plain(text).split(/\s+/)) {
    if (line && line.length + 1 + w.length > width) {
      lines.push(line);
      line = w;
    } else line = line ? `${line} ${w}` : w;
  }
  if (line) lines.push(line);
  return lines.join('\n');
};
const num = (v, d) => (Number.isFinite(v) ? v.toFixed(d) : '—');

// spaceAxisLabels keeps the x-axis labels of a narrow chart apart ("90,000"
// and "120,000" drawn against each other): ticks about every AxisLabelPx,
// and any labels that would still touch are left out.
const AxisLabelPx = 95;
function spaceAxisLabels(option, width) {
  for (const ax of [option.xAxis || []].flat()) {
    if (!ax || ax.type !== 'value') continue;
    ax.splitNumber = Math.max(2, Math.floor(width / AxisLabelPx));
    ax.axisLabel = { ...(ax.axisLabel || {}), hideOverlap: true };
  }
}

// The value axes' extents ECharts 5 gives the data (its interval scale:
// the span over splitNumber rounded to 1, 2, 3, 5 or 10 times a power of
// ten, and each free end floored or ceiled to it; a fixed end, a number
// or dataMin / dataMax, stays; without scale the extent holds 0), or
// null when the axis is of another kind. lo, hi: the data's extent.
function axisExtent(opt, lo, hi) {
  if (!opt || opt.type !== 'value' || !(lo <= hi)) return null;
  const fixMin = typeof opt.min === 'number' || opt.min === 'dataMin';
  const fixMax = typeof opt.max === 'number' || opt.max === 'dataMax';
  if ((opt.min !== undefined && opt.min !== null && !fixMin) || (opt.max !== undefined && opt.max !== null && !fixMax)) return null;
  let a = typeof opt.min === 'number' ? opt.min : lo;
  let b = typeof opt.max === 'number' ? opt.max : hi;
  if (!opt.scale) {
    if (a > 0 && b > 0 && !fixMin) a = 0;
    if (a < 0 && b < 0 && !fixMax) b = 0;
  }
  if (!(b > a)) return null;
  const step = echarts.number.nice((b - a) / (opt.splitNumber || 5), true);
  const round = (v) => +v.toFixed(10);
  if (!fixMin) a = round(Math.floor(a / step) * step);
  if (!fixMax) b = round(Math.ceil(b / step) * step);
  return [a, b];
}

const sameExtent = (p, q) => !!p && !!q && p.every((v, i) => Math.abs(v - q[i]) <= 1e-9 * Math.max(1, Math.abs(v)));

// The x and y extents of a fast layer's data (series id → data).
function dataExtents(data) {
  const e = [[Infinity, -Infinity], [Infinity, -Infinity]];
  for (const d of data.values()) {
    for (const p of d) {
      const v = Array.isArray(p) ? p : p && Array.isArray(p.value) ? p.value : null;
      if (!v) continue;
      for (let k = 0; k < 2; k++) {
        const x = v[k];
        if (typeof x !== 'number' || !Number.isFinite(x)) continue;
        if (x < e[k][0]) e[k][0] = x;
        if (x > e[k][1]) e[k][1] = x;
      }
    }
  }
  return e;
}

// The level-0 series (areas the fast layer does not draw) of an option's
// series list: "id.data" and "id.markArea" → their data as text.
function fixedParts(series) {
  const out = new Map();
  for (const s of series) {
    if (!s || !Fixed.has(s.id)) continue;
    if ('data' in s) out.set(`${s.id}.data`, JSON.stringify(s.data));
    if (s.markArea) out.set(`${s.id}.markArea`, JSON.stringify(s.markArea.data));
  }
  return out;
}

// Whether chart's axes, as they stand, are those ECharts would give the
// data (series id → data). check: the chart has just taken that data;
// a prediction that differs from its axes is logged in miss. Otherwise
// (roomy) a y axis that would shrink by at most half its span also
// holds: the data still fill it, and a ±1 dB nudge of the strongest echo
// across a round number does not re-lay out the chart at every step
// (the chart refits when it is read or next redrawn).
function sameExtents(chart, data, miss, check) {
  const model = chart.getModel();
  const e = dataExtents(data);
  for (const [k, dim] of [[0, 'xAxis'], [1, 'yAxis']]) {
    const ax = model && model.getComponent(dim, 0);
    if (!ax || !ax.axis || model.getComponent(dim, 1)) return false;
    const want = axisExtent(ax.option, e[k][0], e[k][1]);
    const now = ax.axis.scale.getExtent();
    if (sameExtent(want, now)) continue;
    if (!check && k === 1 && want && want[0] >= now[0] && want[1] <= now[1] && want[1] - want[0] >= 0.5 * (now[1] - now[0])) continue;
    if (check && want) {
      miss.push({ chart: chart.getDom().id, axis: dim, want, got: now, data: e[k] });
      if (miss.length > 50) miss.shift();
    }
    return false;
  }
  return true;
}

// Chart calls that read or redraw the chart's own data: a chart whose
// fast layer stands in at rest (Plots.behind) takes its data first.
const SyncCalls = ['getOption', 'getDataURL', 'dispatchAction', 'resize'];
// Pointer events on a chart that ECharts answers from its data (the
// tooltip, a pan): they bring the chart up to date first. Not the wheel:
// over a marker it nudges, and the edit must not wait for a re-layout;
// a zoom brings the chart up to date on its datazoom event.
const SyncEvents = ['pointerdown', 'pointermove', 'mousedown', 'mousemove'];

// carryCharts joins the charts of a skipped frame to the next one's:
// chart name → the list of options to apply in turn (see Plots.apply).
export function carryCharts(older, newer) {
  const out = { ...newer };
  for (const [name, entry] of Object.entries(older)) {
    const prev = [entry].flat();
    const next = name in newer ? [newer[name]].flat() : [];
    out[name] = next.some((e) => e.replace) ? next : [...prev, ...next];
  }
  return out;
}

export class Plots {
  // els: chart name → container element; a container inside a tab pane
  // (.pane) is drawn only while its pane shows.
  constructor(els, { onView, onDrag, onDragEnd, onSelect, onNudge, onCell, hoverCard, wavelength, onSettle }) {
    this.charts = {};
    for (const [name, el] of Object.entries(els)) this.charts[name] = echarts.init(el, null, { renderer: 'canvas' });
    this.els = els;
    this.markers = []; // [{id, x, y, status}] of the profile's markers series
    this.report = null;
    this.onView = onView;
    this.onDrag = onDrag;
    this.onDragEnd = onDragEnd;
    this.onSelect = onSelect;
    this.onNudge = onNudge;
    this.onCell = onCell;
    this.hoverCard = hoverCard;
    this.wavelength = wavelength;
    this.onSettle = onSettle || (() => {});
    // The line charts that follow every frame of a drag get a fast layer,
    // and so does the range–Doppler map (its cells as an image).
    this.fasts = {};
    for (const name of ['profile', 'echo', 'rdmap']) {
      this.fasts[name] = name === 'rdmap' ? new HeatLayer(this.charts[name], 'rdmap') : new FastLayer(this.charts[name]);
      tooltipAbove(this.charts[name]);
    }
    this.fast = this.fasts.profile;
    // Charts whose fast layer stands in for them at rest: the frames
    // rested, and the chart would draw the same axes (and the same level-0
    // areas) as the layer's, so setOption (a whole re-layout, 10–40 ms
    // quiet; the range–Doppler map's 20 ms) waits until something reads or
    // redraws the chart's data.
    this.behind = new Set();
    this.fixed = {}; // chart name → its level-0 series' data as the chart holds them (fixedParts)
    this.axisMiss = []; // predicted extents ECharts did not give (none expected), for the tests
    window.__pwAxisMiss = this.axisMiss;
    for (const name of ['profile', 'echo', 'rdmap']) {
      const chart = this.charts[name];
      for (const m of SyncCalls) {
        const f = chart[m].bind(chart);
        chart[m] = (...a) => {
          this.sync(name);
          return f(...a);
        };
      }
      for (const ev of SyncEvents) els[name].addEventListener(ev, () => this.syncAll(), { capture: true, passive: true });
    }
    this.settleTimer = 0;
    this.drag = null;
    this.lastView = null;
    this.pending = {}; // chart name → options held back (its pane is hidden, or it was drawn just now)
    this.drawnAt = {}; // chart name → when it was last drawn (performance.now)
    this.layouts = {}; // chart name → layoutKey of its last full option
    this.fullDraws = {}; // chart name → full options the chart has drawn (for the tests)
    this.fullsCome = {}; // chart name → full options that have come (for the tests)
    this.timers = {}; // chart name → timer that draws what it holds back
    this.deferred = new Set(); // chart names to draw once the profile's new pixels are out
    this.cats = {}; // heat map name → {x, y}: the cell centres of its category axes
    this.decorators = {}; // chart name → fn(option): tooltips of charts added by other modules (schedule.js)
    this.train = false;

    // Echo and profile share the range axis: zooming one zooms the other.
    this.charts.profile.group = 'pw-range';
    this.charts.echo.group = 'pw-range';
    echarts.connect('pw-range');

    this.charts.profile.on('datazoom', () => this.viewChanged());
    for (const c of Object.values(this.charts)) c.on('datazoom', () => niceTicks(c));
    this.charts.profile.on('datazoom', () => this.syncAll());
    this.charts.echo.on('datazoom', () => this.syncAll());
    // Only a chart whose box changed is resized: a resize re-lays out the
    // chart (and brings a resting one up to date), and the observer also
    // reports boxes that kept their size (the first observation, a pane
    // shown again at its old size).
    const ro = new ResizeObserver((entries) => {
      let changed = false;
      for (const e of entries) {
        const c = echarts.getInstanceByDom(e.target);
        if (!c || (e.target.clientWidth === c.getWidth() && e.target.clientHeight === c.getHeight())) continue;
        c.resize();
        changed = true;
      }
      if (changed) this.viewChanged();
    });
    this.ro = ro;
    for (const el of Object.values(els)) ro.observe(el);
    this.bindPointer(els.profile);
    this.bindMap();
    for (const b of document.querySelectorAll('.plot-head [data-show]')) b.addEventListener('click', () => this.select(b.dataset.show));
  }

  // Apply one frame's chart options: chart name → an option entry, or a
  // list of them to apply in turn (frames skipped on the way). Unknown
  // chart names are ignored; a chart in a hidden pane gets its options
  // when the pane shows.
  apply(frame) {
    this.report = frame.report || null;
    const charts = frame.charts || {};
    this.setTrain(!!(this.report && this.report.waveform && this.report.waveform.doppler_resolution_hz !== undefined));
    for (const [name, entries] of Object.entries(charts)) {
      for (const entry of [entries].flat()) this.applyOne(name, entry);
    }
  }

  applyOne(name, entry) {
    if (!entry || !entry.option || !this.charts[name]) return;
    if (this.hidden(name)) {
      this.hold(name, entry);
      return;
    }
    if (entry.replace) this.fullsCome[name] = (this.fullsCome[name] || 0) + 1;
    // The profile's and the echo's data merges are drawn by their fast
    // layers at once; the charts take them when the frames rest (settle).
    const fast = this.fasts[name];
    // While a marker is dragged, a full option of the range–Doppler map
    // that keeps its layout (its colour scale stepped by 10 dB, its
    // markers) is drawn by the map's fast layer too, on the colour scale
    // the chart's colour bar shows (a cell above its top takes the top
    // colour), and the chart takes it when the drag ends: ECharts re-lays
    // out the map's 16 000 cells for it, 50–120 ms, a long task mid-drag.
    if (name === 'rdmap' && entry.replace && this.drag && fast && fast.ready() && this.layouts[name] === layoutKey(entry.option)) {
      this.behind.delete(name);
      this.hold(name, entry);
      if (fast.draw(entry.option)) {
        this.settleSoon();
        return;
      }
    }
    if (fast && !entry.replace && fast.ready()) {
      const t0 = performance.now();
      this.behind.delete(name);
      this.hold(name, entry);
      if (fast.draw(entry.option)) {
        if (name === 'profile') this.cacheMarkers(entry.option);
        const ms = (fastMs[name] = fastMs[name] || []);
        ms.push(performance.now() - t0);
        if (ms.length > 100) ms.shift();
        this.settleSoon();
        return;
      }
    }
    // The profile is drawn at once; the other plots after the profile's
    // new pixels are on screen (flushDeferred, called by the page after
    // the paint), so that the plot the hand follows is not kept waiting
    // by the others. While frames stream in (a drag, a held key), the
    // other plots redraw at most every SecondaryMs: each setOption
    // re-lays out a whole chart, whatever changed.
    if (name !== 'profile') {
      this.hold(name, entry);
      const every = this.drag ? DragSecondaryMs : SecondaryMs;
      const wait = entry.replace ? 0 : (this.drawnAt[name] || -Infinity) + every - performance.now();
      if (this.timers[name]) return;
      if (wait > 0) this.timers[name] = setTimeout(() => this.flush(name), wait);
      else this.deferred.add(name);
      return;
    }
    if (entry.replace) this.pending[name] = []; // superseded, a resting chart's data merge too
    this.flush(name);
    this.setOption(name, entry);
  }

  // Give the charts behind a fast layer their newest data SettleMs after
  // the last frame, or when the drag in progress ends.
  settleSoon() {
    clearTimeout(this.settleTimer);
    this.settleTimer = setTimeout(() => this.settle(), SettleMs);
  }

  // One chart a task, the profile first: each setOption re-lays out a
  // whole chart (10–40 ms on a quiet machine, 100–300 ms on a busy one),
  // and a frame that comes meanwhile is drawn between two of them (on the
  // fast layers; it puts the rest off by SettleMs again) instead of
  // waiting for all.
  settle() {
    clearTimeout(this.settleTimer);
    this.settleTimer = 0;
    if (this.drag) return; // the drag's end settles
    const waiting = () => Object.keys(this.fasts).find((n) => this.fasts[n].active && !this.behind.has(n));
    const name = waiting();
    if (name) {
      const t0 = performance.now();
      if (this.canWait(name)) {
        this.behind.add(name);
        worked(`settle ${name} put off`, t0);
      } else {
        this.flush(name);
        this.fasts[name].end();
        worked(`settle ${name}`, t0);
      }
    }
    if (waiting()) {
      this.settleTimer = setTimeout(() => this.settle(), 0);
      return;
    }
    this.onSettle();
  }

  // Whether chart name may stay behind its fast layer at rest: it holds
  // one data merge that the layer drew whole and, for the profile and the
  // echo, it is not zoomed, its level-0 series are as the chart holds
  // them, and its axes would come out as they stand.
  canWait(name) {
    if (!this.fasts[name]) return false;
    const q = this.pending[name] || [];
    if (q.length !== 1 || q[0].replace) return false;
    const fast = this.fasts[name];
    const series = [q[0].option.series || []].flat();
    if (name === 'rdmap') {
      // The map's axes and colour scale come with its full options only
      // (its data merges carry series), and it does not zoom.
      return Object.keys(q[0].option).every((k) => k === 'series') && series.every((s) => s && fast.styles.has(s.id));
    }
    if (this.visibleRange() !== null) return false; // zoomed: panning redraws from the chart's data
    if (series.some((s) => !s || (!Fixed.has(s.id) && !fast.styles.has(s.id)))) return false;
    const held = this.fixed[name] || new Map();
    for (const [k, v] of fixedParts(series)) if (held.get(k) !== v) return false;
    return sameExtents(this.charts[name], fast.data, this.axisMiss, false);
  }

  // Give a chart that waits behind its fast layer its data now.
  sync(name) {
    if (!this.behind.has(name)) return;
    const t0 = performance.now();
    this.behind.delete(name);
    this.flush(name);
    this.fasts[name].end();
    worked(`sync ${name}`, t0);
  }

  syncAll() {
    for (const name of [...this.behind]) this.sync(name);
  }

  // Whether a chart is behind its fast layer with work still to do (one
  // that waits until it is read, Plots.behind, is settled).
  unsettled() {
    return Object.entries(this.fasts).some(([n, f]) => f.active && !this.behind.has(n)) || !!this.settleTimer;
  }

  // Draw the plots held back until after the profile's paint; true when
  // there were any.
  flushDeferred() {
    const names = [...this.deferred];
    this.deferred.clear();
    for (const name of names) if (!this.timers[name]) this.flush(name);
    return names.length > 0;
  }

  // The shown charts whose newest options wait for their redraw timer.
  held() {
    return Object.keys(this.timers).filter((k) => this.timers[k] && !this.hidden(k));
  }

  // Keep an option for later. A full option supersedes what came before
  // it; of the data-only merges after it, only the newest matters.
  hold(name, entry) {
    const q = this.pending[name] || [];
    if (entry.replace) this.pending[name] = [entry];
    else if (q.length && !q[q.length - 1].replace) q[q.length - 1] = entry;
    else this.pending[name] = [...q, entry];
  }

  // Draw what chart name holds back, unless its pane is hidden.
  flush(name) {
    clearTimeout(this.timers[name]);
    this.timers[name] = 0;
    if (this.hidden(name)) return;
    this.behind.delete(name);
    const q = this.pending[name] || [];
    this.pending[name] = [];
    for (const entry of q) this.setOption(name, entry);
  }

  setOption(name, entry) {
    const chart = this.charts[name];
    const t0 = performance.now();
    this.drawnAt[name] = t0;
    if (entry.replace) {
      this.layouts[name] = layoutKey(entry.option);
      this.fullDraws[name] = (this.fullDraws[name] || 0) + 1;
      spaceAxisLabels(entry.option, chart.getWidth());
      axisUnits(entry.option);
    }
    // The names' placement first: the fast layer learns it with the styles.
    if (entry.replace && (name === 'profile' || name === 'rdmap' || name.startsWith('cpimap'))) keepNamesClear(name, entry.option, chart);
    if (this.fasts[name] && entry.replace) {
      this.fasts[name].setStyles(entry.option);
      layerSeries(entry.option);
    }
    chart.setOption(entry.option, { notMerge: !!entry.replace });
    if (name === 'profile' || name === 'echo') {
      const series = [entry.option.series || []].flat();
      if (entry.replace || !this.fixed[name]) this.fixed[name] = new Map();
      for (const [k, v] of fixedParts(series)) this.fixed[name].set(k, v);
      // Check the extents canWait predicts against ECharts' own.
      if (this.fasts[name].ready() && this.visibleRange() === null) sameExtents(chart, this.fasts[name].data, this.axisMiss, true);
    }
    niceTicks(chart); // round ticks in the user's units; a no-op while they hold
    // Paint now, inside this animation frame, instead of waiting for the
    // renderer's own loop to notice on the next one.
    chart.getZr().flush();
    // Time per chart, ms, for the latency test (the last 100 of each).
    const ms = (chartMs[name] = chartMs[name] || []);
    ms.push(performance.now() - t0);
    if (ms.length > 100) ms.shift();
    if (entry.replace) this.decorate(name, entry.option);
    if (name === 'profile') this.cacheMarkers(entry.option);
    if (name === 'rdcuts') document.getElementById('rdcuts-hint').hidden = true;
  }

  hidden(name) {
    if (!this.els[name]) return true; // a pane without a chart of that name (the CPI maps)
    const pane = this.els[name].closest('.pane');
    return !!pane && !pane.classList.contains('on');
  }

  // Show the tab pane of chart name, and draw what it missed.
  select(name) {
    const tab = document.querySelector(`.plot-head [data-show="${name}"]`);
    if (!tab) return;
    const fig = tab.closest('.plot');
    for (const b of fig.querySelectorAll('[data-show]')) b.setAttribute('aria-selected', String(b === tab));
    for (const p of fig.querySelectorAll('.pane')) p.classList.toggle('on', p.dataset.pane === name);
    fig.querySelector('button.png').dataset.png = name;
    this.flush(name);
  }

  selected(fig) {
    const b = fig.querySelector('[data-show][aria-selected="true"]');
    return b ? b.dataset.show : null;
  }

  // Pulse trains bring the range–Doppler map and its cuts; the map shows
  // when a scene becomes a pulse train, the echo when it stops being one.
  setTrain(on) {
    if (on === this.train) return;
    this.train = on;
    document.querySelector('.plots').classList.toggle('train', on);
    for (const b of document.querySelectorAll('.plot-head [data-train]')) b.hidden = !on;
    if (on) {
      this.select('rdmap');
      return;
    }
    if (this.selected(document.getElementById('panel-left')) === 'rdmap') this.select('echo');
    if (this.selected(document.getElementById('panel-right')) === 'rdcuts') this.select('response');
  }

  // Redraw the range and range-rate axes of every drawn chart in the
  // units now chosen (units.js); options held back get them when drawn.
  applyUnits() {
    for (const chart of Object.values(this.charts)) {
      const o = chart.getOption();
      if (o && (o.xAxis || o.yAxis)) {
        chart.setOption(axisPatch(o));
        niceTicks(chart);
      }
    }
  }

  // Forget the selected map cell: the cuts pane goes back to its hint.
  clearCell() {
    this.charts.rdcuts.clear();
    this.pending.rdcuts = [];
    document.getElementById('rdcuts-hint').hidden = false;
  }

  // Tooltips of the heat maps, made here (the page runs under a strict
  // CSP, so options carry no functions).
  decorate(name, option) {
    if (this.decorators[name]) return this.decorators[name](option);
    if (name !== 'rdmap' && name !== 'ambiguity') return;
    const x = option.xAxis && option.xAxis[0] && option.xAxis[0].data;
    const y = option.yAxis && option.yAxis[0] && option.yAxis[0].data;
    this.cats[name] = { x: x || [], y: y || [] };
    const formatter = name === 'rdmap' ? (p) => this.mapTip(p) : (p) => this.ambiguityTip(p);
    this.charts[name].setOption({ tooltip: { formatter } });
  }

  mapTip(p) {
    if (p.seriesId === 'rdmap' && Array.isArray(p.data)) {
      const c = this.cats.rdmap;
      const r = c.x[p.data[0]];
      const v = c.y[p.data[1]];
      const lambda = this.wavelength();
      const fd = lambda > 0 ? (-2 * v) / lambda : NaN;
      return `${format('range', r, 1)} · ${signed(v, 1)} · ${num(fd, 0)} Hz\n${num(p.data[2], 1)} dB re noise`;
    }
    if (p.seriesId === 'markers' && p.data) {
      const d = p.data;
      return `${plain(d.id)} · ${String(d.status).replace(/_/g, ' ')}\n${format('range', d.value[0], 1)} · ${signed(d.value[1], 1)}\n${wrap(restate(d.reason || ''))}`;
    }
    return 'selected cell: its cuts are in the “Map cuts” tab';
  }

  ambiguityTip(p) {
    if (!Array.isArray(p.data)) return '';
    const c = this.cats.ambiguity;
    return `delay ${format('range', c.x[p.data[0]], 1)} · Doppler ${num(c.y[p.data[1]], 3)} kHz\n${num(p.data[2], 1)} dB re peak`;
  }

  // A click in the map asks for cuts through that cell.
  bindMap() {
    const chart = this.charts.rdmap;
    chart.getZr().on('click', (ev) => {
      const px = [ev.offsetX, ev.offsetY];
      if (!chart.containPixel({ gridIndex: 0 }, px)) return;
      const v = chart.convertFromPixel({ xAxisIndex: 1, yAxisIndex: 1 }, px);
      if (!v || !Number.isFinite(v[0]) || !Number.isFinite(v[1])) return;
      this.onCell({ range_m: v[0], range_rate_mps: v[1] });
      this.select('rdcuts');
    });
  }

  cacheMarkers(option) {
    const series = Array.isArray(option.series) ? option.series : option.series ? [option.series] : [];
    const m = series.find((s) => s && s.id === SeriesMarkers);
    if (!m || !Array.isArray(m.data)) return;
    const targets = (this.report && this.report.targets) || [];
    this.markers = m.data.map((d, i) => {
      const v = Array.isArray(d) ? d : d && Array.isArray(d.value) ? d.value : [NaN, NaN];
      return { id: (d && d.id) || (targets[i] && targets[i].id) || '', x: Number(v[0]), y: Number(v[1]), status: (d && d.status) || '' };
    });
  }

  // The range shown on the profile plot, or null when it shows the whole
  // receive window.
  visibleRange() {
    const chart = this.charts.profile;
    const dz = chart.getModel() && chart.getModel().getComponent('dataZoom', 0);
    if (!dz) return null;
    const [s, e] = dz.getPercentRange();
    if (s <= 0 && e >= 100) return null;
    const axis = chart.getModel().getComponent('xAxis', 0);
    if (!axis || !axis.axis) return null;
    const [a, b] = axis.axis.scale.getExtent();
    return Number.isFinite(a) && Number.isFinite(b) ? [a, b] : null;
  }

  viewChanged() {
    const range = this.visibleRange();
    const width = this.charts.profile.getWidth();
    const mapWidth = this.charts.rdmap.getWidth();
    const key = JSON.stringify([range, width, mapWidth]);
    if (key === this.lastView) return;
    this.lastView = key;
    this.onView(range, width, mapWidth);
  }

  markerPixel(m) {
    const chart = this.charts.profile;
    try {
      const p = chart.convertToPixel({ seriesId: SeriesMarkers }, [m.x, m.y]);
      if (p && Number.isFinite(p[0])) return p;
    } catch { /* series not there yet */ }
    return null;
  }

  // The marker under the pointer at (px, py) in the chart's pixels.
  hit(px, py) {
    let best = null;
    let bestD = HitPx;
    for (const m of this.markers) {
      const p = this.markerPixel(m);
      if (!p) continue;
      const d = Math.hypot(p[0] - px, p[1] - py);
      if (d <= bestD) {
        best = m;
        bestD = d;
      }
    }
    return best;
  }

  rangeAt(px) {
    const v = this.charts.profile.convertFromPixel({ xAxisIndex: 0 }, px);
    return Number.isFinite(v) ? v : null;
  }

  // Pointer handling on the profile plot runs in the capture phase, before
  // ECharts sees the event, so that a drag on a marker does not pan.
  bindPointer(el) {
    const local = (ev) => {
      const r = el.getBoundingClientRect();
      return [ev.clientX - r.left, ev.clientY - r.top];
    };
    el.addEventListener('pointerdown', (ev) => {
      if (ev.button !== 0) return;
      const [px, py] = local(ev);
      const m = this.hit(px, py);
      if (!m) return;
      ev.stopPropagation();
      ev.preventDefault();
      el.setPointerCapture(ev.pointerId);
      // The target moves as far as the pointer does, from where it is: a
      // folded target's marker shows its ghost, an extended target's its
      // peak, not the range the scenario holds. A marker held at the
      // window's edge (a target outside it) comes to the pointer instead.
      const r0 = m.status === 'out_of_window' ? null : this.rangeAt(px);
      this.drag = { id: m.id, pointerId: ev.pointerId, startX: px, moved: false, r0 };
      this.onSelect(m.id);
    }, true);
    el.addEventListener('pointermove', (ev) => {
      const [px, py] = local(ev);
      if (this.drag && ev.pointerId === this.drag.pointerId) {
        ev.stopPropagation();
        if (!this.drag.moved && Math.abs(px - this.drag.startX) < 2) return;
        this.drag.moved = true;
        // Moves come faster than frames: handle the newest once per frame.
        this.drag.px = px;
        if (!this.drag.queued) {
          this.drag.queued = true;
          requestAnimationFrame(() => this.dragStep());
        }
        return;
      }
      const m = this.hit(px, py);
      el.style.cursor = m ? 'ew-resize' : '';
      this.hoverCard(m ? { id: m.id, clientX: ev.clientX, clientY: ev.clientY } : null);
    }, true);
    const end = (ev) => {
      if (!this.drag || ev.pointerId !== this.drag.pointerId) return;
      ev.stopPropagation();
      if (this.drag.queued) this.dragStep(); // the last position counts
      this.drag = null;
      this.guide(null);
      this.onDragEnd();
      if (this.unsettled()) this.settleSoon();
    };
    // ECharts listens to mouse events (on the chart and, while a button is
    // down, on the document), not pointer events: while a marker is
    // dragged, its hover, tooltip and axis pointer sit still.
    window.addEventListener('mousemove', (ev) => {
      if (this.drag) ev.stopPropagation();
    }, true);
    el.addEventListener('pointerup', end, true);
    el.addEventListener('pointercancel', end, true);
    el.addEventListener('pointerleave', () => this.hoverCard(null));
    el.addEventListener('wheel', (ev) => {
      const [px, py] = local(ev);
      // One wheel gesture stays on the marker it started on, even when the
      // nudged peak moves from under the pointer: it never turns into a
      // zoom. It ends when the pointer moves away or the wheel rests.
      const now = ev.timeStamp;
      const w = this.wheelLock;
      const lock = w && now - w.t < WheelGestureMs && Math.hypot(px - w.px, py - w.py) < 6 ? w : null;
      const m = lock || this.hit(px, py);
      if (!m) {
        this.wheelLock = null;
        return;
      }
      this.wheelLock = { id: m.id, t: now, px: lock ? w.px : px, py: lock ? w.py : py };
      ev.stopPropagation();
      ev.preventDefault();
      this.onSelect(m.id);
      this.onNudge(m.id, (ev.deltaY < 0 ? 1 : -1) * (ev.shiftKey ? 0.1 : 1));
    }, { capture: true, passive: false });
  }

  // One step of a drag, at most once per animation frame: the target
  // follows the newest pointer position (onDrag(id, range there, range
  // where the drag started, or null: to the pointer)).
  dragStep() {
    const d = this.drag;
    if (!d || !d.queued) return;
    d.queued = false;
    const r = this.rangeAt(d.px);
    if (r !== null) this.onDrag(d.id, r, d.r0);
    this.guide(d.px);
    this.hoverCard(null);
  }

  // Draw (px) or remove (null) the vertical guide shown while dragging: a
  // page element over the chart, so that a drag step does not redraw it.
  guide(px) {
    const el = this.els.profile;
    let g = el.querySelector('.drag-guide');
    if (px === null) {
      if (g) g.hidden = true;
      return;
    }
    if (!g) {
      g = document.createElement('div');
      g.className = 'drag-guide';
      el.append(g);
    }
    g.hidden = false;
    g.style.left = `${Math.round(px)}px`;
  }

  png(name) {
    return this.charts[name].getDataURL({ type: 'png', pixelRatio: 2, backgroundColor: '#ffffff' });
  }

  // The profile plot's series as CSV: range and each line series' value.
  profileCSV() {
    const opt = this.charts.profile.getOption();
    const xData = opt.xAxis && opt.xAxis[0] && opt.xAxis[0].data;
    // The annotations (masking segments, blind range) are not series of the profile.
    const cols = (opt.series || []).filter((s) => s.type === 'line' && Array.isArray(s.data) && s.id !== 'masking' && s.id !== 'blind');
    const rows = new Map();
    cols.forEach((s, ci) => {
      s.data.forEach((d, i) => {
        const v = Array.isArray(d) ? d : d && Array.isArray(d.value) ? d.value : [xData ? xData[i] : i, d && d.value !== undefined ? d.value : d];
        const x = Number(v[0]);
        if (!rows.has(x)) rows.set(x, new Array(cols.length).fill(''));
        rows.get(x)[ci] = v[1];
      });
    });
    const head = ['range_m', ...cols.map((s) => `${s.id || s.name}_db`)].join(',');
    const body = [...rows.entries()].sort((a, b) => a[0] - b[0]).map(([x, vs]) => [x, ...vs].join(','));
    return [head, ...body].join('\n') + '\n';
  }
}

// layoutKey names what places a chart's data on its grid: the type,
// extent and categories of its axes, as the server sent them (before the
// page formats their labels).
function layoutKey(option) {
  const axes = (a) => [a || []].flat().map((x) => x && [x.type, x.min, x.max, x.data]);
  return JSON.stringify([axes(option.xAxis), axes(option.yAxis), option.grid]);
}
