// The plots. Each ECharts instance is created once; frames from the server
// carry the options ({replace, option}) and are applied with setOption.
// The page adds only interaction overlays: the drag guide on the profile
// plot and a hover card built from the report.

import * as echarts from '../vendor/echarts/echarts.esm.min.js';
import { SeriesMarkers } from './protocol.js';

const HitPx = 9; // how near the pointer must be to a marker, px

export class Plots {
  // els: {profile, echo, response, ambiguity} container elements.
  constructor(els, { onView, onDrag, onDragEnd, onSelect, onNudge, hoverCard }) {
    this.charts = {};
    // A chart in a hidden figure (the ambiguity surface) is created when
    // its first option arrives; every chart is created once.
    for (const [name, el] of Object.entries(els)) {
      if (!el.closest('[hidden]')) this.charts[name] = echarts.init(el, null, { renderer: 'canvas' });
    }
    this.els = els;
    this.markers = []; // [{id, x, y}] of the profile's markers series
    this.report = null;
    this.onView = onView;
    this.onDrag = onDrag;
    this.onDragEnd = onDragEnd;
    this.onSelect = onSelect;
    this.onNudge = onNudge;
    this.hoverCard = hoverCard;
    this.drag = null;
    this.lastView = null;
    this.applied = {}; // chart name → the last option applied, as JSON

    // Echo and profile share the range axis: zooming one zooms the other.
    this.charts.profile.group = 'pw-range';
    this.charts.echo.group = 'pw-range';
    echarts.connect('pw-range');

    this.charts.profile.on('datazoom', () => this.viewChanged());
    const ro = new ResizeObserver(() => {
      for (const c of Object.values(this.charts)) c.resize();
      this.viewChanged();
    });
    this.ro = ro;
    for (const el of Object.values(els)) ro.observe(el);
    this.bindPointer(els.profile);
  }

  // Apply one frame's chart options. Unknown chart names are ignored.
  apply(frame) {
    this.report = frame.report || null;
    for (const [name, entry] of Object.entries(frame.charts || {})) {
      if (!entry || !entry.option) continue;
      let chart = this.charts[name];
      if (!chart && this.els[name]) {
        this.els[name].closest('[hidden]').hidden = false;
        chart = this.charts[name] = echarts.init(this.els[name], null, { renderer: 'canvas' });
      }
      if (!chart) continue;
      // An option the chart holds already (the waveform's response while
      // targets move) is not drawn again: applying the same option twice
      // gives the same picture.
      const key = (entry.replace ? 'r' : 'm') + JSON.stringify(entry.option);
      if (key === this.applied[name]) continue;
      this.applied[name] = key;
      chart.setOption(entry.option, { notMerge: !!entry.replace, lazyUpdate: false });
      if (name === 'profile') this.cacheMarkers(entry.option);
    }
  }

  cacheMarkers(option) {
    const series = Array.isArray(option.series) ? option.series : option.series ? [option.series] : [];
    const m = series.find((s) => s && s.id === SeriesMarkers);
    if (!m || !Array.isArray(m.data)) return;
    const targets = (this.report && this.report.targets) || [];
    this.markers = m.data.map((d, i) => {
      const v = Array.isArray(d) ? d : d && Array.isArray(d.value) ? d.value : [NaN, NaN];
      return { id: (d && d.id) || (targets[i] && targets[i].id) || '', x: Number(v[0]), y: Number(v[1]) };
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
    const key = JSON.stringify([range, width]);
    if (key === this.lastView) return;
    this.lastView = key;
    this.onView(range, width);
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
      this.drag = { id: m.id, pointerId: ev.pointerId, startX: px, moved: false };
      this.onSelect(m.id);
    }, true);
    el.addEventListener('pointermove', (ev) => {
      const [px, py] = local(ev);
      if (this.drag && ev.pointerId === this.drag.pointerId) {
        ev.stopPropagation();
        if (!this.drag.moved && Math.abs(px - this.drag.startX) < 2) return;
        this.drag.moved = true;
        const r = this.rangeAt(px);
        if (r !== null) this.onDrag(this.drag.id, r);
        this.guide(px);
        this.hoverCard(null);
        return;
      }
      const m = this.hit(px, py);
      el.style.cursor = m ? 'ew-resize' : '';
      this.hoverCard(m ? { id: m.id, clientX: ev.clientX, clientY: ev.clientY } : null);
    }, true);
    const end = (ev) => {
      if (!this.drag || ev.pointerId !== this.drag.pointerId) return;
      ev.stopPropagation();
      this.drag = null;
      this.guide(null);
      this.onDragEnd();
    };
    el.addEventListener('pointerup', end, true);
    el.addEventListener('pointercancel', end, true);
    el.addEventListener('pointerleave', () => this.hoverCard(null));
    el.addEventListener('wheel', (ev) => {
      const [px, py] = local(ev);
      const m = this.hit(px, py);
      if (!m) return;
      ev.stopPropagation();
      ev.preventDefault();
      this.onSelect(m.id);
      this.onNudge(m.id, (ev.deltaY < 0 ? 1 : -1) * (ev.shiftKey ? 0.1 : 1));
    }, { capture: true, passive: false });
  }

  // Draw (px) or remove (null) the vertical guide shown while dragging.
  guide(px) {
    const chart = this.charts.profile;
    if (px === null) {
      chart.setOption({ graphic: [{ id: 'pw-drag-guide', $action: 'remove' }] });
      return;
    }
    const h = chart.getHeight();
    chart.setOption({
      graphic: [{
        id: 'pw-drag-guide', type: 'line', silent: true, z: 100,
        shape: { x1: px, y1: 30, x2: px, y2: h - 40 },
        style: { stroke: '#b4561d', lineWidth: 1.5, lineDash: [5, 4] },
      }],
    });
  }

  png(name) {
    return this.charts[name].getDataURL({ type: 'png', pixelRatio: 2, backgroundColor: '#ffffff' });
  }

  // The profile plot's series as CSV: range and each line series' value.
  profileCSV() {
    const opt = this.charts.profile.getOption();
    const xData = opt.xAxis && opt.xAxis[0] && opt.xAxis[0].data;
    const cols = (opt.series || []).filter((s) => s.type === 'line' && Array.isArray(s.data));
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
