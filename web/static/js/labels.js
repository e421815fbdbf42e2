// Marker names on the profile (and on the range–Doppler map) kept clear
// of the other markers and of the masking labels. ECharts' hideOverlap keeps labels apart from one another
// but not from other symbols: a target beside another (an aircraft in
// front of a rain band, a buoy in the surf line) had its name written
// over its neighbour's marker. A name that would cover another marker or
// a masking label goes under its own marker instead, or over it, to its
// left or right, the first of these places that is clear; otherwise it
// stays where the chart put it. Applied by the chart library when the
// plot is laid out at rest (the page's fast layer, drawing while frames
// stream, keeps names above).

// The page's fast layers (fastlayer.js) place the names they draw by the
// same rules (clearPlace, placeMasking), so that a chart resting behind its
// fast layer shows its names where the chart would.

// Half a marker's symbol and a margin, px: the profile's are 11 px, the
// maps' (the range–Doppler map, a schedule's CPI maps) 13 px.
export const halfOf = (name) => (name === 'profile' ? 7 : 8);

// Above this many markers the names keep ECharts' own placement (hidden
// where they overlap): moving them costs a crowded plot's layout more
// than it helps (201 targets 1 px apart: about 1.6× the layout time).
export const MaxPlaced = 64;

// clearPlace returns where a name whose box is L (chart px, {x, y,
// width, height}) beside its marker's drawn box R goes when it meets one
// of the boxes others: the first clear place of under, over, left and
// right of the marker, as the box {x, y, width, height} there; null when
// it is clear where it is or no place is.
export function clearPlace(L, R, others) {
  if (!others.some((r) => meets(r, L))) return null;
  const mid = R.y + R.height / 2 - L.height / 2;
  const places = [
    [0, R.y + R.height + 3 - L.y], // under
    [0, R.y - 3 - L.height - L.y], // over (a map's name sits at the right)
    [R.x - 4 - L.width - L.x, mid - L.y], // left
    [R.x + R.width + 4 - L.x, mid - L.y], // right
  ];
  for (const [dx, dy] of places) {
    const to = { x: L.x + dx, y: L.y + dy, width: L.width, height: L.height };
    if (!others.some((r) => meets(r, to))) return to;
  }
  return null;
}

// shiftPast returns how far right a masking label whose box is L moves
// to start clear of the boxes obstacles (the markers), px (0: it is
// clear).
export function shiftPast(L, obstacles) {
  let dx = 0;
  for (let moved = true; moved;) {
    moved = false;
    for (const r of obstacles) {
      if (meets(r, { x: L.x + dx, y: L.y, width: L.width, height: L.height }) && r.x + r.width + 3 - L.x > dx) {
        dx = r.x + r.width + 3 - L.x;
        moved = true;
      }
    }
  }
  return dx;
}

// placeMasking returns where a masking label whose box is L (chart px;
// it starts just right of the masked target's end of its segment) goes,
// as [dx, dy] px: where it is, or else above or below that end, or to its
// left (ending before the target), above or below there, the first place
// clear of the boxes obstacles (the markers and the masking labels placed
// before it; half: a marker's half size)
// and inside the chart's width right. Only when none is, it moves right
// past the markers, as far as the chart's right edge allows. It moved
// right past every marker in its way: the harbour's "tanker's response
// masks skiff" sat beside the pilot boat 1.1 km on, and a label near the
// right edge was cut ("… masks pilot").
export function placeMasking(L0, obstacles, half, right) {
  // The chart library gives a label's box a few px high whatever its
  // font (its 11 px bold): at least a line of text, about its middle.
  const h = Math.max(L0.height, 14);
  const L = { x: L0.x, y: L0.y + L0.height / 2 - h / 2, width: L0.width, height: h };
  const up = -(L.height / 2 + half + 3);
  const down = L.height / 2 + half + 3;
  const back = -(L.width + 10);
  for (const [dx, dy] of [[0, 0], [0, up], [0, down], [back, 0], [back, up], [back, down]]) {
    const to = { x: L.x + dx, y: L.y + dy, width: L.width, height: L.height };
    if (to.x >= 0 && to.x + to.width <= right && !obstacles.some((r) => meets(r, to))) return [dx, dy];
  }
  let dx = shiftPast(L, obstacles);
  if (L.x + dx + L.width > right) dx = Math.max(right - L.width - L.x, -L.x);
  return [dx, 0];
}

// keepNamesClear gives the markers series of a full option of the chart
// name ('profile', 'rdmap', 'cpimapK') its label placement.
export function keepNamesClear(name, option, chart) {
  const half = halfOf(name);
  const series = [option.series || []].flat();
  const m = series.find((s) => s && s.id === 'markers');
  if (!m) return;
  const place = (p) => {
    const out = { hideOverlap: true };
    const s = chart.getModel() && chart.getModel().getSeriesByIndex(p.seriesIndex);
    if (!s || s.getData().count() > MaxPlaced) return out;
    const L = p.labelRect;
    const to = clearPlace(L, p.rect, obstacles(chart, p.seriesIndex, p.dataIndex, half));
    // Placed absolutely: the chart library drops an offset (dx, dy) from
    // a label with a plate (the map's names).
    if (to) return { ...out, x: to.x, y: to.y, align: 'left', verticalAlign: 'top' };
    return out;
  };
  // The fast layer reads these off the series' labelLayout.
  place.hideOverlap = true;
  place.clear = half;
  m.labelLayout = place;
  // A masking label ("rain-band's response masks light-aircraft") that
  // starts over a marker (the masker 150 m beyond) or past the plot's
  // right edge goes to the nearest clear place (placeMasking).
  const k = series.find((s) => s && s.id === 'masking');
  if (k) {
    k.labelLayout = (p) => {
      const mi = markersIndex(chart);
      if (mi < 0 || chart.getModel().getSeriesByIndex(mi).getData().count() > MaxPlaced) return {};
      const L = p.labelRect;
      // The masking labels placed before this one in the pass are in
      // the way too (two targets masked by one tanker).
      const placed = placedMasks(chart);
      const [dx, dy] = placeMasking(L, obstacles(chart, mi, -1, half, false).concat(placed), half, chart.getWidth());
      const h = Math.max(L.height, 14);
      placed.push({ x: L.x + dx, y: L.y + L.height / 2 - h / 2 + dy, width: L.width, height: h });
      // Placed absolutely, as above.
      return dx || dy ? { x: L.x + dx, y: L.y + dy, align: 'left', verticalAlign: 'top' } : {};
    };
    k.labelLayout.clear = half;
  }
}

function markersIndex(chart) {
  const s = chart.getModel() && chart.getModel().getSeries().find((x) => x.id === 'markers');
  return s ? s.seriesIndex : -1;
}

function meets(a, b) {
  return a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
}

// obstacles are the boxes, in chart px, of every marker but the one at
// dataIndex and (withLabels) of the masking labels drawn. One layout pass
// asks once per label: the boxes are found once per pass (256 targets
// would otherwise cost 256² look-ups) and kept until the pass's task ends.
let passes = null;
function obstacles(chart, seriesIndex, dataIndex, half, withLabels = true) {
  if (!passes) {
    passes = new Map();
    queueMicrotask(() => { passes = null; });
  }
  const key = `${chart.id}/${seriesIndex}/${withLabels}`;
  let all = passes.get(key);
  if (!all) passes.set(key, (all = boxes(chart, seriesIndex, half, withLabels)));
  return all.filter((b) => b.i !== dataIndex);
}

// placedMasks is the list of the masking labels placed so far in this
// layout pass of chart, kept as the obstacles are.
function placedMasks(chart) {
  if (!passes) {
    passes = new Map();
    queueMicrotask(() => { passes = null; });
  }
  const key = `${chart.id}/masks`;
  let all = passes.get(key);
  if (!all) passes.set(key, (all = []));
  return all;
}

function boxes(chart, seriesIndex, half, withLabels) {
  const out = [];
  const model = chart.getModel();
  const markers = model && seriesIndex >= 0 && model.getSeriesByIndex(seriesIndex);
  if (!markers) return out;
  const data = markers.getData();
  data.each((i) => {
    const el = data.getItemGraphicEl(i);
    if (el && Number.isFinite(el.x) && Number.isFinite(el.y)) {
      out.push({ i, x: el.x - half, y: el.y - half, width: 2 * half, height: 2 * half });
    }
  });
  const masking = withLabels && model.getSeries().find((s) => s.id === 'masking');
  if (masking) {
    const md = masking.getData();
    md.each((i) => {
      const el = md.getItemGraphicEl(i);
      const path = el && (el.getSymbolPath ? el.getSymbolPath() : el);
      const tx = path && path.getTextContent && path.getTextContent();
      if (!tx || tx.ignore || tx.invisible || !tx.style || !tx.style.text) return;
      const r = tx.getBoundingRect().clone();
      r.applyTransform(tx.getComputedTransform());
      out.push({ i: -2, x: r.x, y: r.y, width: r.width, height: r.height });
    });
  }
  return out;
}
