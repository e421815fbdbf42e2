package web_test

import (
	"fmt"
	"testing"

	"github.com/chromedp/chromedp"
)

// mapPixels samples, at the centre of every heat-map cell away from the
// markers and their names (wherever the chart placed them), the range–Doppler map as ECharts drew it (its series layer)
// and as the page's heat layer (fastlayer.js, HeatLayer) draws the same
// data; the pairs of colours come back as [[r,g,b, r,g,b], …]. A cell
// matches when the layer's colour equals ECharts' at its centre or at a
// pixel beside it (cells are about 2 px wide).
const mapPixels = `(() => {
	const plots = window.__pw.plots, chart = plots.charts.rdmap, fast = plots.fasts.rdmap;
	const o = chart.getOption();
	const cells = o.series.find((s) => s.id === 'rdmap').data;
	const marks = o.series.find((s) => s.id === 'markers').data.map((d) => chart.convertToPixel({xAxisIndex: 1, yAxisIndex: 1}, d.value));
	const names = [];
	const md = chart.getModel().getSeries().find((s) => s.id === 'markers').getData();
	md.each((i) => { const el = md.getItemGraphicEl(i); const p = el && (el.getSymbolPath ? el.getSymbolPath() : el); const tx = p && p.getTextContent && p.getTextContent();
		if (!tx || tx.ignore || tx.invisible) return; const r = tx.getBoundingRect().clone(); r.applyTransform(tx.getComputedTransform()); names.push(r); });
	const rect = chart.getModel().getComponent('grid', 0).coordinateSystem.getRect();
	const cols = o.xAxis[0].data.length, rows = o.yAxis[0].data.length;
	const dpr = window.devicePixelRatio || 1;
	const theirs = fast.layer().dom.getContext('2d').getImageData(0, 0, fast.layer().dom.width, fast.layer().dom.height);
	fast.draw({series: [{id: 'rdmap', data: cells}]});
	const ours = fast.canvas.getContext('2d').getImageData(0, 0, fast.canvas.width, fast.canvas.height);
	fast.end();
	const at = (img, x, y) => { const i = 4 * (Math.floor(y * dpr) * img.width + Math.floor(x * dpr)); return [img.data[i], img.data[i + 1], img.data[i + 2]]; };
	const out = [];
	for (const [c, r] of cells) {
		const x = rect.x + (c + 0.5) * rect.width / cols, y = rect.y + rect.height - (r + 0.5) * rect.height / rows;
		if (marks.some((m) => x > m[0] - 14 && x < m[0] + 100 && Math.abs(m[1] - y) < 14)) continue;
		if (names.some((r) => x > r.x - 2 && x < r.x + r.width + 2 && y > r.y - 2 && y < r.y + r.height + 2)) continue;
		const mine = at(ours, x, y);
		const near = [[0, 0], [-1, 0], [1, 0], [0, -1], [0, 1]].map(([dx, dy]) => at(theirs, x + dx, y + dy));
		const best = near.reduce((a, b) => (Math.max(...b.map((v, i) => Math.abs(v - mine[i]))) < Math.max(...a.map((v, i) => Math.abs(v - mine[i]))) ? b : a));
		out.push([...mine, ...best]);
	}
	return out;
})()`

// TestMapFastLayer: the range–Doppler map of the pulse-train demo is drawn
// by the page's heat layer while a marker is dragged, in the colours
// ECharts gives the same cells, and ECharts takes the newest data when
// the map is read (at rest its heat layer stands in).
func TestMapFastLayer(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the map drawn and settled", fresh+` && window.__pw.plots.fasts.rdmap.ready()`)
	px := eval[[][]float64](t, ctx, mapPixels)
	if len(px) < 200 {
		t.Fatalf("%d map cells compared, want at least 200", len(px))
	}
	bad := 0
	for _, p := range px {
		for i := range 3 {
			if d := p[i] - p[i+3]; d > 4 || d < -4 {
				bad++
				if bad <= 5 {
					t.Errorf("cell colour %v, ECharts %v", p[:3], p[3:])
				}
				break
			}
		}
	}
	if bad > 0 {
		t.Errorf("%d of %d cells differ from ECharts' colours", bad, len(px))
	}

	// Drag the helicopter on the profile with real mouse events: the map
	// follows on the heat layer, its marker moving with the target.
	before := eval[float64](t, ctx, `window.__pw.plots.charts.rdmap.getOption().series.find((s) => s.id === 'markers').data.find((d) => d.id === 'helicopter').value[0]`)
	p := markerPx(t, ctx, "helicopter")
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	x, y := ox+p[0], oy+p[1]
	mouse(t, ctx, chromedp.MouseMoved, x, y)
	mouse(t, ctx, chromedp.MousePressed, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	for i := 1; i <= 8; i++ {
		mouse(t, ctx, chromedp.MouseMoved, x+float64(6*i), y, held)
	}
	// Wait (button still down) for a frame drawn by the heat layer.
	waitFor(t, ctx, "the map on its heat layer", `window.__pw.plots.fasts.rdmap.active && (() => {
		const m = window.__pw.plots.fasts.rdmap.data.get('markers').find((d) => d.id === 'helicopter');
		return m && m.value[0] > `+fmt.Sprint(before+1)+`; })()`)
	shot(t, ctx, "map-dragging")
	mouse(t, ctx, chromedp.MouseReleased, x+48, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	// At rest the map stays on its heat layer (ECharts' 20 ms re-layout
	// waits) until something reads the chart: reading it brings ECharts
	// up to date and ends the layer.
	waitFor(t, ctx, "the drag's last frame, at rest", fresh+` && window.__pw.plots.behind.has('rdmap') && window.__pw.plots.fasts.rdmap.active`)
	after := eval[float64](t, ctx, `window.__pw.plots.charts.rdmap.getOption().series.find((s) => s.id === 'markers').data.find((d) => d.id === 'helicopter').value[0]`)
	if eval[bool](t, ctx, `window.__pw.plots.fasts.rdmap.active || window.__pw.plots.behind.has('rdmap')`) {
		t.Errorf("reading the map did not bring ECharts up to date (its heat layer still stands in)")
	}
	want := eval[float64](t, ctx, jsTarget+`('helicopter').range_m`)
	if after <= before+1 {
		t.Errorf("after the drag the map's helicopter marker is at %.1f m (before %.1f m): the chart did not take the newest data", after, before)
	}
	if d := after - want; d > 50 || d < -50 {
		t.Errorf("map marker at %.1f m, the target at %.1f m", after, want)
	}
	shot(t, ctx, "map-settled")
}
