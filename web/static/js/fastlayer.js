// A light drawing layer of our own over a line chart (the profile and the
// echo), for frames that
// stream in (a marker dragged, a level nudged with the wheel or the keys,
// a value typed). ECharts re-lays out and repaints a whole chart on every
// setOption, data-only merges included: axes and their labels, legend,
// zoom slider, tooltip pointer, 10 ms on a quiet machine and 40–140 ms on
// a busy one. So while frames stream, the chart's data series (drawn on
// their own canvas layer, zlevel FastZ) are hidden and each frame's data
// is drawn here instead, on the chart's axes as they stand, in about a
// millisecond. When the frames rest, the chart takes the newest data and
// this layer clears (Plots.settle).
//
// What it draws: the line series with their colour, width, dash and
// opacity; the masking segments and their labels; the threshold's end
// label; the target markers with their status shapes and names. Values
// beyond the axes as they stood are clipped to the plot area until the
// chart settles and rescales.

import { MaxPlaced, clearPlace, placeMasking } from './labels.js';

// The zlevel of the series this layer stands in for. The blind range and
// the clutter breakthrough areas (mark areas, which the chart takes when
// the frames rest) stay with the axes on level 0.
export const FastZ = 1;

// Series that stay on level 0.
export const Fixed = new Set(['blind', 'breakthrough']);

const Font = '11px sans-serif';
const BoldFont = 'bold 11px sans-serif';

// Dash patterns of ECharts' line types, in line widths.
const dashes = { dashed: [4, 4], dotted: [1, 2] };

// Put the data series of a full profile option on level FastZ.
export function layerSeries(option) {
  for (const s of [option.series || []].flat()) {
    if (s && !Fixed.has(s.id)) s.zlevel = FastZ;
  }
}

// The tooltip's text is added to the renderer directly, on level 0; it
// must stay above the series' level.
export function tooltipAbove(chart) {
  const zr = chart.getZr();
  const add = zr.add.bind(zr);
  zr.add = (el) => {
    if (el && el.type === 'text') el.zlevel = FastZ + 1;
    return add(el);
  };
}

export class FastLayer {
  // axes: the x and y axis indices the series are drawn on.
  constructor(chart, axes = { x: 0, y: 0 }) {
    this.chart = chart;
    this.axes = axes;
    this.canvas = document.createElement('canvas');
    this.canvas.className = 'fast-layer';
    this.canvas.hidden = true;
    // Over the chart's own canvases, under the drag guide (z-index 3).
    Object.assign(this.canvas.style, { position: 'absolute', left: '0', top: '0', pointerEvents: 'none', zIndex: '2' });
    chart.getDom().append(this.canvas);
    this.styles = new Map(); // series id → how it is drawn
    this.data = new Map(); // series id → its newest data
    this.labels = []; // the labels last drawn, each with its box
    this.marks = []; // the markers last drawn whose names labels.js places
    this.active = false;
  }

  // Learn the series' looks from a full option; a drawing in progress
  // ends (the full option is about to be drawn by the chart).
  setStyles(option) {
    this.end();
    this.styles.clear();
    this.data.clear();
    for (const s of [option.series || []].flat()) {
      if (!s || !s.id || Fixed.has(s.id)) continue;
      const ls = s.lineStyle || {};
      const is = s.itemStyle || {};
      this.styles.set(s.id, {
        type: s.type,
        name: s.name,
        symbol: s.symbol,
        colour: ls.color || is.color || '#333',
        width: ls.width ?? 2,
        dash: dashes[ls.type] || null,
        opacity: ls.opacity ?? 1,
        size: s.symbolSize || 10,
        border: is.borderColor ? { colour: is.borderColor, width: is.borderWidth ?? 1 } : null,
        label: s.label && s.label.show ? s.label : null,
        hideOverlap: !!(s.labelLayout && s.labelLayout.hideOverlap),
        clear: (s.labelLayout && s.labelLayout.clear) || 0, // labels.js places its names: half a marker, px

        opacity80: is.opacity ?? 0.8, // a scatter series' symbols (ECharts' default)
        endLabel: s.endLabel && s.endLabel.show ? s.endLabel : null,
      });
      if (Array.isArray(s.data)) this.data.set(s.id, s.data);
    }
  }

  // Whether the layer can stand in for the chart: it knows the series
  // and the chart has drawn them on their own level.
  ready() {
    return this.styles.size > 0 && !!this.layer();
  }

  layer() {
    const painter = this.chart.getZr().painter;
    const layers = painter && painter.getLayers ? painter.getLayers() : null;
    return layers && layers[FastZ] ? layers[FastZ] : null;
  }

  // Draw a data-only merge {series: [{id, data}, …]}.
  draw(option) {
    for (const s of [option.series || []].flat()) {
      if (s && this.styles.has(s.id) && Array.isArray(s.data)) this.data.set(s.id, s.data);
    }
    const map = this.mapping();
    if (!map) return false;
    if (!this.active) {
      this.active = true;
      this.canvas.hidden = false;
    }
    const layer = this.layer();
    if (layer && layer.dom) layer.dom.style.visibility = 'hidden';
    this.paint(map);
    return true;
  }

  // Stop standing in: show the chart's own series again (the caller has
  // just given the chart the newest data) and clear.
  end() {
    if (!this.active) return;
    this.active = false;
    const layer = this.layer();
    if (layer && layer.dom) layer.dom.style.visibility = '';
    this.canvas.hidden = true;
  }

  // data → pixel, from the axes as the chart last laid them out.
  mapping() {
    const model = this.chart.getModel();
    const xa = model && model.getComponent('xAxis', this.axes.x);
    const ya = model && model.getComponent('yAxis', this.axes.y);
    if (!xa || !xa.axis || !ya || !ya.axis) return null;
    const [x0, x1] = xa.axis.scale.getExtent();
    const [y0, y1] = ya.axis.scale.getExtent();
    const axes = { xAxisIndex: this.axes.x, yAxisIndex: this.axes.y };
    const p0 = this.chart.convertToPixel(axes, [x0, y0]);
    const p1 = this.chart.convertToPixel(axes, [x1, y1]);
    if (!p0 || !p1 || !(x1 > x0) || !(y1 > y0) || ![...p0, ...p1].every(Number.isFinite)) return null;
    const kx = (p1[0] - p0[0]) / (x1 - x0);
    const ky = (p1[1] - p0[1]) / (y1 - y0);
    return {
      x: (v) => p0[0] + (v - x0) * kx,
      y: (v) => p0[1] + (v - y0) * ky,
      rect: { x: Math.min(p0[0], p1[0]), y: Math.min(p0[1], p1[1]), w: Math.abs(p1[0] - p0[0]), h: Math.abs(p1[1] - p0[1]) },
    };
  }

  paint(map) {
    const w = this.chart.getWidth();
    const h = this.chart.getHeight();
    const dpr = window.devicePixelRatio || 1;
    const c = this.canvas;
    if (c.width !== Math.round(w * dpr) || c.height !== Math.round(h * dpr)) {
      c.width = Math.round(w * dpr);
      c.height = Math.round(h * dpr);
      c.style.width = `${w}px`;
      c.style.height = `${h}px`;
    }
    const g = c.getContext('2d');
    g.setTransform(dpr, 0, 0, dpr, 0, 0);
    g.clearRect(0, 0, w, h);
    this.under(g, map);
    const legend = this.chart.getModel().getComponent('legend', 0);
    const shown = (st) => !legend || !legend.isSelected || !st.name || legend.isSelected(st.name);
    // As ECharts stacks them: the lines, their labels, then the markers
    // (a series of a higher z) over those labels, and their names.
    const labels = [];
    const clipped = (fn) => {
      g.save();
      g.beginPath();
      g.rect(map.rect.x, map.rect.y, map.rect.w, map.rect.h);
      g.clip();
      fn();
      g.restore();
    };
    const scatters = [];
    clipped(() => {
      for (const [id, st] of this.styles) {
        const data = this.data.get(id);
        if (!data || !shown(st)) continue;
        if (st.type === 'line') this.line(g, map, st, data, labels);
        else if (st.type === 'scatter') scatters.push([st, data]);
      }
    });
    const lineLabels = labels.length;
    this.marks = [];
    for (const [st, data] of scatters) this.markers(null, map, st, data, labels);
    if (this.marks.length <= MaxPlaced) placeNames(g, labels, this.marks, w);
    this.labels = hideOverlaps(g, labels);
    const kept = new Set(this.labels);
    for (const l of labels.slice(0, lineLabels)) if (kept.has(l)) text(g, l);
    clipped(() => {
      for (const [st, data] of scatters) this.markers(g, map, st, data, null);
    });
    for (const l of labels.slice(lineLabels)) if (kept.has(l)) text(g, l);
  }

  // What lies under the series (the heat map's cells); nothing here.
  under() {}

  line(g, map, st, data, labels) {
    g.save();
    g.globalAlpha = st.opacity;
    g.strokeStyle = st.colour;
    g.lineWidth = st.width;
    g.setLineDash(st.dash ? st.dash.map((d) => d * Math.max(st.width, 1)) : []);
    g.beginPath();
    let pen = false;
    let last = null;
    for (const d of data) {
      const v = Array.isArray(d) ? d : d && d.value;
      if (!v || v[0] === null || v[1] === null || v[0] === undefined || v[1] === undefined) {
        pen = false;
        continue;
      }
      const px = map.x(v[0]);
      const py = map.y(v[1]);
      if (pen) g.lineTo(px, py);
      else g.moveTo(px, py);
      pen = true;
      last = [px, py];
      if (d && d.label && d.label.show && d.label.formatter) {
        labels.push({ x: px + (d.label.distance ?? 5), y: py, text: d.label.formatter, colour: d.label.color || st.colour,
          font: d.label.fontWeight === 'bold' ? BoldFont : Font, align: 'left', base: 'middle', plate: d.label.backgroundColor, shift: st.clear });
      }
    }
    g.stroke();
    g.restore();
    if (st.endLabel && last) {
      const off = st.endLabel.offset || [0, 0];
      labels.push({ x: last[0] + 5 + off[0], y: last[1] + off[1], text: String(st.endLabel.formatter || st.name), colour: st.endLabel.color || st.colour,
        font: Font, align: 'left', base: 'middle' });
    }
  }

  // Draw a scatter series' symbols on g, or (g null) add their names to
  // labels.
  markers(g, map, st, data, labels) {
    const r = st.size / 2;
    // ECharts draws a scatter series' symbols at opacity 0.8 unless told.
    if (g) {
      g.save();
      g.globalAlpha = st.opacity80;
    }
    for (const d of data) {
      const v = Array.isArray(d) ? d : d && d.value;
      if (!v || !Number.isFinite(v[0]) || !Number.isFinite(v[1])) continue;
      const px = map.x(v[0]);
      const py = map.y(v[1]);
      const is = (d && d.itemStyle) || {};
      const border = is.borderColor ? { colour: is.borderColor, width: is.borderWidth ?? 1 } : st.border;
      if (g) {
        symbol(g, d.symbol || st.symbol || 'circle', px, py, r, is.color || st.colour, border);
        continue;
      }
      const b = symbolBox(d.symbol || st.symbol || 'circle', r, border ? border.width : 0);
      // The marker, for the names' placement (labels.js): its point and
      // its drawn box.
      const mark = { x: px, y: py, half: st.clear, rect: { x: px - b.right, y: py + b.top, width: 2 * b.right, height: b.bottom - b.top } };
      if (st.clear) this.marks.push(mark);
      if (st.label && d.name) {
        const colour = st.label.color || '#25292e';
        const hide = st.hideOverlap;
        // ECharts places a label by the symbol's drawn box, its outline
        // included, 5 px away.
        const of = st.clear ? mark : null;
        if (st.label.position === 'right') {
          labels.push({ x: px + b.right + 5, y: py + (b.top + b.bottom) / 2, text: String(d.name), colour, font: Font, align: 'left', base: 'middle',
            plate: st.label.backgroundColor, line: st.label.lineHeight, hide, of });
        } else labels.push({ x: px, y: py + b.top - 5, text: String(d.name), colour, font: Font, align: 'center', base: 'bottom', hide, of });
      }
    }
    if (g) g.restore();
  }
}

// A fast layer for a heat map (the range–Doppler map): its cells, on
// hidden category axes 0, are painted as one image scaled to the grid, in
// the continuous visual map's colours, and the scatter series over it
// (markers, the selected cell) on the value axes 1, as FastLayer draws
// them. A heat map of 16 000 cells costs ECharts 50–190 ms a setOption
// here; the image, a few milliseconds.
export class HeatLayer extends FastLayer {
  constructor(chart, heatId) {
    super(chart, { x: 1, y: 1 });
    this.heatId = heatId;
    this.heat = null; // {cols, rows, min, max, lut} from the full option
    this.image = null; // the cells' canvas, cols × rows
  }

  setStyles(option) {
    super.setStyles(option);
    this.heat = null;
    const series = [option.series || []].flat();
    const hs = series.find((s) => s && s.id === this.heatId);
    const xs = [option.xAxis || []].flat()[0];
    const ys = [option.yAxis || []].flat()[0];
    const vm = [option.visualMap || []].flat()[0];
    const colours = vm && vm.inRange && vm.inRange.color;
    if (!hs || !xs || !ys || !Array.isArray(xs.data) || !Array.isArray(ys.data) || !vm || vm.type === 'piecewise' ||
      !Array.isArray(colours) || colours.length < 2 || !(vm.max > vm.min)) return;
    this.heat = { cols: xs.data.length, rows: ys.data.length, min: vm.min, max: vm.max, lut: colourTable(colours) };
    this.styles.set(this.heatId, { type: 'heatmap' });
    if (Array.isArray(hs.data)) this.data.set(this.heatId, hs.data);
  }

  ready() {
    return !!this.heat && super.ready();
  }

  under(g) {
    const h = this.heat;
    const cells = this.data.get(this.heatId);
    const grid = this.chart.getModel().getComponent('grid', 0);
    const cs = grid && grid.coordinateSystem;
    if (!h || !cells || !cs) return;
    const rect = cs.getRect();
    // The colour span as the user left the visual map's handles.
    const vm = this.chart.getModel().getComponent('visualMap', 0);
    const range = vm && Array.isArray(vm.option.range) ? vm.option.range : [h.min, h.max];
    if (!this.image || this.image.width !== h.cols || this.image.height !== h.rows) {
      this.image = document.createElement('canvas');
      this.image.width = h.cols;
      this.image.height = h.rows;
    }
    const ig = this.image.getContext('2d');
    const img = ig.createImageData(h.cols, h.rows);
    const px = new Uint32Array(img.data.buffer);
    const k = (h.lut.length - 1) / (h.max - h.min);
    for (const d of cells) {
      const v = Array.isArray(d) ? d : d && d.value;
      if (!v) continue;
      const [c, r, db] = v;
      if (!(c >= 0 && c < h.cols && r >= 0 && r < h.rows) || !(db >= range[0] && db <= range[1])) continue;
      const i = Math.round((Math.min(Math.max(db, h.min), h.max) - h.min) * k);
      // Row 0 is the bottom row of the plot, the top of the image.
      px[(h.rows - 1 - r) * h.cols + c] = h.lut[i];
    }
    ig.putImageData(img, 0, 0);
    g.save();
    g.imageSmoothingEnabled = false;
    g.drawImage(this.image, rect.x, rect.y, rect.width, rect.height);
    g.restore();
  }
}

// colourTable interpolates colour stops, evenly spaced as a continuous
// visual map spreads them, into 256 RGBA pixels (in the byte order of
// the platform, for a Uint32Array over ImageData).
function colourTable(colours) {
  const probe = document.createElement('canvas').getContext('2d');
  const rgb = colours.map((c) => {
    probe.fillStyle = '#000';
    probe.fillStyle = c;
    const s = probe.fillStyle; // normalised: #rrggbb or rgba(…)
    if (s[0] === '#') return [1, 3, 5].map((i) => parseInt(s.slice(i, i + 2), 16));
    return s.replace(/[^\d.,]/g, '').split(',').slice(0, 3).map(Number);
  });
  const bytes = new Uint8ClampedArray(256 * 4);
  for (let i = 0; i < 256; i++) {
    const t = (i / 255) * (rgb.length - 1);
    const j = Math.min(Math.floor(t), rgb.length - 2);
    const f = t - j;
    for (let ch = 0; ch < 3; ch++) bytes[4 * i + ch] = rgb[j][ch] + (rgb[j + 1][ch] - rgb[j][ch]) * f;
    bytes[4 * i + 3] = 255;
  }
  return new Uint32Array(bytes.buffer);
}

// symbol draws a marker of size 2r at (x, y) with the path ECharts
// (5.x, its symbol.ts) builds for the same symbol name (symbolPath), so
// that a marker keeps its status shape on this layer.
function symbol(g, kind, x, y, r, colour, border) {
  symbolPath(g, kind, x, y, r);
  if (kind === 'emptyCircle') {
    g.fillStyle = '#fff';
    g.fill();
    g.lineWidth = 2;
    g.strokeStyle = colour;
    g.stroke();
    return;
  }
  if (colour !== 'transparent') {
    g.fillStyle = colour;
    g.fill();
  }
  if (border) {
    g.lineWidth = border.width;
    g.strokeStyle = border.colour;
    g.stroke();
  }
}

// symbolPath begins a path of symbol kind, of size 2r, at (x, y) on g.
export function symbolPath(g, kind, x, y, r) {
  g.beginPath();
  switch (kind) {
    case 'roundRect':
      g.roundRect(x - r, y - r, 2 * r, 2 * r, r / 2); // corner radius: a quarter of the side
      break;
    case 'pin': {
      // A pin whose tip is at (x, y): a circle 3/5 of the size wide on
      // top, joined to the tip by two curves.
      const w = (2 * r * 3) / 5;
      const h = Math.max(w, 2 * r);
      const a = w / 2;
      const dy = (a * a) / (h - a);
      const cy = y - h + a + dy;
      const u = Math.asin(dy / a);
      const dx = Math.cos(u) * a;
      const tx = Math.sin(u);
      const ty = Math.cos(u);
      const c1 = 0.6 * a;
      const c2 = 0.7 * a;
      g.moveTo(x - dx, cy + dy);
      g.arc(x, cy, a, Math.PI - u, 2 * Math.PI + u);
      g.bezierCurveTo(x + dx - tx * c1, cy + dy + ty * c1, x, y - c2, x, y);
      g.bezierCurveTo(x, y - c2, x - dx + tx * c1, cy + dy + ty * c1, x - dx, cy + dy);
      g.closePath();
      break;
    }
    case 'arrow': {
      // ECharts' arrow hangs from (x, y), its notched base 2r below.
      const dx = (2 * r * 2) / 3;
      g.moveTo(x, y);
      g.lineTo(x + dx, y + 2 * r);
      g.lineTo(x, y + 1.5 * r);
      g.lineTo(x - dx, y + 2 * r);
      g.lineTo(x, y);
      g.closePath();
      break;
    }
    case 'diamond':
      g.moveTo(x, y - r);
      g.lineTo(x + r, y);
      g.lineTo(x, y + r);
      g.lineTo(x - r, y);
      g.closePath();
      break;
    case 'triangle':
      g.moveTo(x, y - r);
      g.lineTo(x + r, y + r);
      g.lineTo(x - r, y + r);
      g.closePath();
      break;
    case 'rect':
      g.rect(x - r, y - r, 2 * r, 2 * r);
      break;
    default:
      g.arc(x, y, kind === 'emptyCircle' ? r - 1 : r, 0, 2 * Math.PI);
  }
}

// placeNames moves the labels as labels.js has the chart move them (the
// chart's labelLayout): a masking label that starts over a marker or past
// the right edge (right, px) goes to the first clear place near its
// target (placeMasking), then a marker's name that meets another marker or a
// masking label goes to the first clear place around its marker. marks
// are the markers drawn ({x, y, half, rect}), the labels' of.
function placeNames(g, labels, marks, right) {
  // A plate's box, or the text's: its width by the font's size (11 px;
  // the line box, 13 px, would find no place beside a marker that the
  // glyphs clear).
  const box = (l) => {
    const b = labelBox(g, l);
    if (l.plate) return { x: b.x, y: b.y, width: b.w, height: b.h };
    return { x: b.x, y: l.base === 'bottom' ? l.y - 11 : l.y - 5.5, width: b.w, height: 11 };
  };
  const square = (m) => ({ x: m.x - m.half, y: m.y - m.half, width: 2 * m.half, height: 2 * m.half });
  const plates = [];
  for (const l of labels) {
    if (!l.shift) continue;
    const L = box(l);
    const [dx, dy] = placeMasking(L, marks.map(square).concat(plates), l.shift, right);
    l.x += dx;
    l.y += dy;
    plates.push((l.ink = box(l)));
  }
  for (const l of labels) {
    if (!l.of) continue;
    const L = box(l);
    const others = marks.filter((m) => m !== l.of).map(square).concat(plates);
    const to = clearPlace(L, l.of.rect, others);
    if (to) {
      l.x += to.x - L.x;
      l.y += to.y - L.y;
    }
    l.ink = box(l); // where it ends up, for the tests
  }
}

// hideOverlaps returns the labels to draw: as ECharts' labelLayout
// hideOverlap does, a label of a series that asks for it is left out when
// it would overlap one of those labels placed before it (in series and
// data order; the markers are all of one size, which ECharts ranks
// first). Each label kept gets its box, {x, y, w, h} in CSS px.
function hideOverlaps(g, labels) {
  const placed = [];
  const out = [];
  for (const l of labels) {
    l.box = labelBox(g, l);
    if (l.hide) {
      const b = l.box;
      if (placed.some((p) => b.x < p.x + p.w && p.x < b.x + b.w && b.y < p.y + p.h && p.y < b.y + b.h)) continue;
      placed.push(b);
    }
    out.push(l);
  }
  return out;
}

// labelBox is the box text(g, l) draws in: the plate, or the text. A
// label with a line height (the map's names) has ECharts' plate: the
// text's width by the line height, without padding.
function labelBox(g, l) {
  g.font = l.font;
  const w = g.measureText(l.text).width;
  const x = l.align === 'center' ? l.x - w / 2 : l.x;
  if (l.line) return { x, y: l.base === 'bottom' ? l.y - l.line : l.y - l.line / 2, w, h: l.line };
  const y = l.base === 'bottom' ? l.y - 13 : l.y - 8;
  return l.plate ? { x: x - 3, y, w: w + 6, h: 16 } : { x, y, w, h: 13 };
}

// symbolBox is the box ECharts' symbol of size 2r covers around its
// point, its outline (width bw) included: {top, bottom, right} offsets.
function symbolBox(kind, r, bw) {
  const o = bw / 2;
  if (kind === 'pin') {
    const a = (2 * r * 3) / 10;
    const h = Math.max(2 * a, 2 * r);
    return { top: -h + (a * a) / (h - a) - o, bottom: o, right: a + o };
  }
  if (kind === 'arrow') return { top: -o, bottom: 2 * r + o, right: (4 * r) / 3 + o };
  return { top: -r - o, bottom: r + o, right: r + o };
}

function text(g, l) {
  g.font = l.font;
  g.textAlign = l.align;
  g.textBaseline = l.base;
  if (l.plate) {
    const b = l.box || labelBox(g, l);
    g.fillStyle = l.plate;
    if (l.line) {
      g.beginPath();
      g.roundRect(b.x, b.y, b.w, b.h, 3);
      g.fill();
    } else g.fillRect(b.x, b.y, b.w, b.h);
  }
  g.fillStyle = l.colour;
  g.fillText(l.text, l.x, l.y);
}
