package web_test

import (
	"fmt"
	"testing"
)

// The markers and their names on the range–Doppler map: the page's heat
// layer (fastlayer.js) draws each status's symbol as ECharts does, and
// no two names are drawn over each other, by ECharts or by the layer.

// mapScene is the pulse-train demo with the jet moved clear of the
// ridge, so that no two markers touch, and a strong target beyond the
// unambiguous range (c·PRI/2 = 15 km), whose echo folds into the window.
const mapScene = `fetch('/api/v1/demos/hill-clutter-doppler').then((r) => r.json()).then((s) => {
	s.targets.find((t) => t.id === 'jet').range_m = 10500;
	s.targets.push({id: 'far', kind: 'point', range_m: 20600, rcs_dbsm: 30, range_rate_mps: 30});
	return s; })`

// markerMasks compares, in a box around each marker of the map, the
// pixels of the marker's outline colour as ECharts drew them (its series
// layer) and as the heat layer draws the same data: for each marker
// {id, symbol, theirs, ours, both} (pixel counts).
const markerMasks = `(() => {
	const plots = window.__pw.plots, chart = plots.charts.rdmap, fast = plots.fasts.rdmap;
	const o = chart.getOption();
	const cells = o.series.find((s) => s.id === 'rdmap').data;
	const marks = o.series.find((s) => s.id === 'markers').data;
	const dpr = window.devicePixelRatio || 1;
	const dom = fast.layer().dom;
	const theirs = dom.getContext('2d').getImageData(0, 0, dom.width, dom.height);
	fast.draw({series: [{id: 'rdmap', data: cells}]});
	const ours = fast.canvas.getContext('2d').getImageData(0, 0, fast.canvas.width, fast.canvas.height);
	fast.end();
	const rgb = (hex) => [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
	const near = (img, x, y, c) => { const i = 4 * (y * img.width + x); return Math.max(...c.map((v, k) => Math.abs(img.data[i + k] - v))) <= 40; };
	return marks.map((d) => {
		const p = chart.convertToPixel({xAxisIndex: 1, yAxisIndex: 1}, d.value);
		const c = rgb(d.itemStyle.borderColor);
		let a = 0, b = 0, both = 0;
		// The symbols are 13 px; a pin reaches 13 px above its tip.
		for (let y = Math.floor((p[1] - 15) * dpr); y <= Math.ceil((p[1] + 9) * dpr); y++) {
			for (let x = Math.floor((p[0] - 9) * dpr); x <= Math.ceil((p[0] + 9) * dpr); x++) {
				const t = near(theirs, x, y, c), u = near(ours, x, y, c);
				a += t; b += u; both += t && u;
			}
		}
		return {id: d.id, symbol: d.symbol, theirs: a, ours: b, both};
	});
})()`

// markerAreas compares the area each map marker's path encloses, as
// ECharts built it for its symbol element (its path commands replayed on
// a canvas at the element's transform) and as the layer's symbolPath
// builds it for the same symbol, on a 0.25 px grid around the marker:
// for each marker {id, symbol, theirs, ours, both} (grid points inside).
const markerAreas = `(async () => {
	const { symbolPath } = await import('/js/fastlayer.js');
	const chart = window.__pw.plots.charts.rdmap;
	const s = chart.getModel().getSeries().find((x) => x.id === 'markers');
	const data = s.getData();
	const g = document.createElement('canvas').getContext('2d');
	const e = document.createElement('canvas').getContext('2d');
	const out = [];
	data.each((i) => {
		const el = data.getItemGraphicEl(i);
		const path = el.getSymbolPath ? el.getSymbolPath() : el;
		const d = data.getRawDataItem(i);
		const p = chart.convertToPixel({xAxisIndex: 1, yAxisIndex: 1}, d.value);
		const size = s.get('symbolSize');
		symbolPath(g, d.symbol, p[0], p[1], size / 2);
		if (!path.path) path.createPathProxy();
		path.path.reset();
		path.buildPath(path.path, path.shape);
		const m = path.getComputedTransform() || [1, 0, 0, 1, 0, 0];
		e.setTransform(m[0], m[1], m[2], m[3], m[4], m[5]);
		e.beginPath();
		path.path.rebuildPath(e, 1);
		e.setTransform(1, 0, 0, 1, 0, 0);
		let a = 0, b = 0, both = 0;
		for (let y = p[1] - 16; y <= p[1] + 10; y += 0.25) {
			for (let x = p[0] - 10; x <= p[0] + 10; x += 0.25) {
				const t = e.isPointInPath(x, y), u = g.isPointInPath(x, y);
				a += t; b += u; both += t && u;
			}
		}
		out.push({id: d.id, symbol: d.symbol, theirs: a, ours: b, both});
	});
	return out;
})()`

func TestMapMarkerShapes(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	eval[bool](t, ctx, `(async () => { const s = await `+mapScene+`; window.__pw.store.load(s); return true; })()`)
	waitFor(t, ctx, "the map drawn and settled", fresh+` && window.__pw.frame().report.targets.some((t) => t.id === 'far') && window.__pw.plots.fasts.rdmap.ready()`)
	type mask struct {
		ID, Symbol         string
		Theirs, Ours, Both float64
	}
	masks := eval[[]mask](t, ctx, markerMasks)
	seen := map[string]bool{}
	for _, m := range masks {
		seen[m.Symbol] = true
		// The outlines agree when most of the pixels either draws in the
		// status colour are drawn by both (intersection over union).
		iou := m.Both / max(m.Theirs+m.Ours-m.Both, 1)
		t.Logf("%-10s %-10s ECharts %3.0f px, layer %3.0f px, both %3.0f: %.2f", m.ID, m.Symbol, m.Theirs, m.Ours, m.Both, iou)
		if m.Theirs < 10 {
			t.Errorf("%s (%s): %0.f outline pixels in ECharts' drawing; the marker is not where the test looks", m.ID, m.Symbol, m.Theirs)
		}
		if iou < 0.6 {
			t.Errorf("%s: the layer's %s covers %.0f%% of the outline ECharts draws (union), want ≥ 60%%", m.ID, m.Symbol, 100*iou)
		}
	}
	for _, m := range eval[[]mask](t, ctx, markerAreas) {
		iou := m.Both / max(m.Theirs+m.Ours-m.Both, 1)
		t.Logf("%-10s %-10s area: ECharts %5.0f, layer %5.0f, both %5.0f: %.3f", m.ID, m.Symbol, m.Theirs, m.Ours, m.Both, iou)
		if m.Theirs < 100 || iou < 0.97 {
			t.Errorf("%s: the layer's %s covers %.1f%% of the area ECharts' symbol covers (union; %0.f grid points in ECharts'), want ≥ 97%%", m.ID, m.Symbol, 100*iou, m.Theirs)
		}
	}
	for _, s := range []string{"roundRect", "pin", "circle"} {
		if !seen[s] {
			t.Errorf("no %s marker on the map (symbols %v): the scene does not test it", s, seen)
		}
	}
	// The layer, while it stands in for the chart, as a screenshot.
	eval[bool](t, ctx, `(() => { const f = window.__pw.plots.fasts.rdmap; f.draw({series: []}); return true; })()`)
	shot(t, ctx, "layer")
	eval[bool](t, ctx, `(window.__pw.plots.fasts.rdmap.end(), true)`)
	shot(t, ctx, "echarts")
}

// labelBoxes are the boxes of the map's marker names that are drawn:
// ECharts' (its label elements not hidden; pale: the share of the box's
// pixels on the chart's series layer that are pale, as the name's plate
// is, and not the colour of a cell drawn over it) and the heat layer's,
// as {name: [x, y, w, h, pale]} in CSS px.
const labelBoxes = `(() => {
	const plots = window.__pw.plots, chart = plots.charts.rdmap, fast = plots.fasts.rdmap;
	const s = chart.getModel().getSeries().find((x) => x.id === 'markers');
	const data = s.getData();
	const dom = fast.layer().dom;
	const img = dom.getContext('2d').getImageData(0, 0, dom.width, dom.height);
	const dpr = window.devicePixelRatio || 1;
	const pale = (r) => {
		let n = 0, p = 0;
		for (let y = Math.ceil(r.y * dpr); y < (r.y + r.height) * dpr; y++) {
			for (let x = Math.ceil(r.x * dpr); x < (r.x + r.width) * dpr; x++) {
				const i = 4 * (y * img.width + x);
				n++;
				p += Math.min(img.data[i], img.data[i + 1], img.data[i + 2]) >= 170;
			}
		}
		return n ? p / n : 0;
	};
	const theirs = {};
	data.each((i) => {
		const el = data.getItemGraphicEl(i);
		const path = el && (el.getSymbolPath ? el.getSymbolPath() : el);
		const tx = path && path.getTextContent();
		if (!tx || tx.ignore || tx.invisible) return;
		const r = tx.getBoundingRect().clone();
		r.applyTransform(tx.getComputedTransform());
		theirs[data.getName(i)] = [r.x, r.y, r.width, r.height, pale(r)];
	});
	const cells = chart.getOption().series.find((x) => x.id === 'rdmap').data;
	fast.draw({series: [{id: 'rdmap', data: cells}]});
	const ours = {};
	for (const l of fast.labels) ours[l.text] = [l.box.x, l.box.y, l.box.w, l.box.h, 1];
	fast.end();
	return {theirs, ours};
})()`

// TestMapLabelsDoNotOverlap: with the ridge moved under the jet (as a
// drag of the ridge leaves it), no marker's name on the range–Doppler
// map is drawn over another's, by ECharts or by the heat layer, and no
// heat-map cell is drawn over a name.
func TestMapLabelsDoNotOverlap(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	eval[bool](t, ctx, `(async () => { const s = await fetch('/api/v1/demos/hill-clutter-doppler').then((r) => r.json());
		const r = s.targets.find((t) => t.id === 'ridge'); r.range_start_m = 7600; r.range_stop_m = 9600;
		window.__pw.store.load(s); return true; })()`)
	waitFor(t, ctx, "the map drawn and settled", fresh+` && window.__pw.frame().report.targets.some((t) => t.id === 'ridge' && t.range_m >= 7600) && window.__pw.plots.fasts.rdmap.ready()`)
	boxes := eval[map[string]map[string][]float64](t, ctx, labelBoxes)
	for _, who := range []string{"theirs", "ours"} {
		b := boxes[who]
		if len(b) < 3 {
			t.Errorf("%s: %d marker names drawn (%v), want at least 3 of the 4", who, len(b), b)
		}
		var names []string
		for n, r := range b {
			names = append(names, n)
			if r[3] < 10 {
				t.Errorf("%s: the name %q is %.1f px high: its box is not the plate's", who, n, r[3])
			}
			if r[4] < 0.5 {
				t.Errorf("%s: %.0f%% of the name %q's box is pale: something is drawn over it", who, 100*r[4], n)
			}
		}
		for i, n := range names {
			for _, m := range names[i+1:] {
				p, q := b[n], b[m]
				if p[0] < q[0]+q[2] && q[0] < p[0]+p[2] && p[1] < q[1]+q[3] && q[1] < p[1]+p[3] {
					t.Errorf("%s: the names %q %v and %q %v overlap", who, n, fmt.Sprint(p), m, fmt.Sprint(q))
				}
			}
		}
		t.Logf("%s: %v", who, b)
	}
	shot(t, ctx, "")
	eval[bool](t, ctx, `(() => { const f = window.__pw.plots.fasts.rdmap; f.draw({series: []}); return true; })()`)
	shot(t, ctx, "layer")
	eval[bool](t, ctx, `(window.__pw.plots.fasts.rdmap.end(), true)`)
}
