package web_test

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// loadDemo picks a built-in scene from the menu, as a user does, and
// waits for its frame.
func loadDemo(t *testing.T, ctx context.Context, name string) {
	t.Helper()
	waitFor(t, ctx, "the demo menu", fmt.Sprintf(`!!document.querySelector('#demo-select option[value=%q]')`, name))
	do(t, ctx, chromedp.Evaluate[chromedp.Void](fmt.Sprintf(`(() => { const s = document.querySelector('#demo-select');
		s.value = %q; s.dispatchEvent(new Event('change', {bubbles: true})); })()`, name)))
	waitFor(t, ctx, name+" evaluated", fmt.Sprintf(`(async () => { const d = await (await fetch('/api/v1/demos/%s')).json();
		const f = window.__pw.frame(); return f && f.report.scenario === d.name && f.id >= window.__pw.session.nextId - 1; })()`, name))
}

// The pulse-train demo shows its range–Doppler map with a marker per
// target, the helicopter detected on it, and cuts through a clicked cell.
func TestPulseTrainMap(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	if eval[bool](t, ctx, `!document.querySelector('[data-show="rdmap"]').hidden`) {
		t.Error("the map's tab shows for a single-pulse scene")
	}
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the map drawn", `(() => { const o = window.__pw.plots.charts.rdmap.getOption();
		return o.series && o.series.length >= 2 && o.series[0].data.length > 100; })()`)
	if !eval[bool](t, ctx, `document.querySelector('[data-pane="rdmap"]').classList.contains('on')`) {
		t.Error("the map pane is not shown for a pulse train")
	}
	if got := eval[string](t, ctx, jsTarget+`('helicopter').status`); got != "detected" {
		t.Errorf("helicopter %s, want detected", got)
	}
	type mark struct {
		ID     string     `json:"id"`
		Status string     `json:"status"`
		Value  [2]float64 `json:"value"`
	}
	marks := eval[[]mark](t, ctx, `window.__pw.plots.charts.rdmap.getOption().series.find((s) => s.id === 'markers').data`)
	if len(marks) != 4 {
		t.Fatalf("%d markers on the map, want 4", len(marks))
	}
	var heli mark
	for _, m := range marks {
		if m.ID == "helicopter" {
			heli = m
		}
	}
	if heli.Status != "detected" || heli.Value[1] > -20 || heli.Value[1] < -30 {
		t.Errorf("helicopter marker %+v, want detected near −25 m/s", heli)
	}
	cells := eval[int](t, ctx, `window.__pw.plots.charts.rdmap.getOption().series[0].data.length`)
	if cells > 16000 {
		t.Errorf("%d heat map cells; the server must reduce the map", cells)
	}
	shot(t, ctx, "map")

	// Click the helicopter's marker: cuts through its cell.
	px := eval[[]float64](t, ctx, fmt.Sprintf(`window.__pw.plots.charts.rdmap.convertToPixel({xAxisIndex: 1, yAxisIndex: 1}, [%g, %g])`, heli.Value[0], heli.Value[1]))
	clickAt(t, ctx, `#chart-rdmap`, px[0], px[1])
	waitFor(t, ctx, "the cuts", `(() => { const o = window.__pw.plots.charts.rdcuts.getOption();
		return o.series && o.series.length === 4 && o.series[2].data.length > 8; })()`)
	if !eval[bool](t, ctx, `document.querySelector('[data-pane="rdcuts"]').classList.contains('on') && document.querySelector('#rdcuts-hint').hidden`) {
		t.Error("the cuts pane is not shown")
	}
	// The noise-free Doppler cut through the helicopter's cell peaks near
	// its −25 m/s, well above the cut 10 m/s away (the ridge's clutter at
	// 0 m/s may be stronger still).
	near := eval[[]float64](t, ctx, `(() => { const d = window.__pw.plots.charts.rdcuts.getOption().series[3].data;
		const pk = d.filter((p) => Math.abs(p[0] + 25) < 5).reduce((a, b) => (b[1] > a[1] ? b : a));
		const off = d.reduce((a, b) => (Math.abs(b[0] + 15) < Math.abs(a[0] + 15) ? b : a));
		return [pk[0], pk[1], off[1]]; })()`)
	if near[1]-near[2] < 20 {
		t.Errorf("Doppler cut: %.1f dB at %.1f m/s, %.1f dB at −15 m/s; want the helicopter's peak 20 dB clear", near[1], near[0], near[2])
	}
	shot(t, ctx, "cuts")

	// The map's tooltip gives the Doppler shift beside the range rate.
	tip := eval[string](t, ctx, `(() => { const p = window.__pw.plots; const d = p.charts.rdmap.getOption().series[0].data[0];
		return p.mapTip({seriesId: 'rdmap', data: d}); })()`)
	if !strings.Contains(tip, " m/s · ") || !strings.Contains(tip, " Hz\n") || !strings.Contains(tip, "dB re noise") {
		t.Errorf("map tooltip %q", tip)
	}

	// The map follows the profile's zoom, at full resolution inside it.
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`window.__pw.plots.charts.profile.dispatchAction({type: 'dataZoom', dataZoomIndex: 0, startValue: 6800, endValue: 7400})`))
	waitFor(t, ctx, "the zoomed map", `(() => { const x = window.__pw.plots.charts.rdmap.getOption().xAxis[1]; return x.min > 6750 && x.max < 7450; })()`)
	step := eval[float64](t, ctx, `(() => { const d = window.__pw.plots.charts.rdmap.getOption().xAxis[0].data; return (d[d.length - 1] - d[0]) / (d.length - 1); })()`)
	// A column per range sample: c/(2·fs), fs defaulting to 2·B.
	cell := eval[float64](t, ctx, `(() => { const s = window.__pw.store.scenario;
		return 299792458 / 2 / (s.radar.sample_rate_hz || 2 * window.__pw.frame().report.waveform.bandwidth_hz); })()`)
	if math.Abs(step-cell) > 0.05*cell {
		t.Errorf("zoomed map: columns %.2f m apart, want one per range sample (%.2f m)", step, cell)
	}
	shot(t, ctx, "zoomed")

	// Back to a single pulse: the map's tabs go, the echo returns.
	loadDemo(t, ctx, "harbour-skiff")
	waitFor(t, ctx, "the echo pane", `document.querySelector('[data-pane="echo"]').classList.contains('on') && document.querySelector('[data-show="rdmap"]').hidden`)
}

// The ambiguity surface and its cuts sit in tabs beside the response.
func TestAmbiguityTabs(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="ambiguity"]`)))
	waitFor(t, ctx, "the surface", `(() => { const o = window.__pw.plots.charts.ambiguity.getOption();
		return o.series && o.series[0].type === 'heatmap' && o.series[0].data.length > 100 && o.visualMap[0].max === 0; })()`)
	if eval[string](t, ctx, `document.querySelector('.plot button.png[data-png="ambiguity"]') ? 'ok' : ''`) != "ok" {
		t.Error("the PNG button does not follow the tab")
	}
	shot(t, ctx, "surface")
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="ambcuts"]`)))
	// The zero-Doppler cut peaks at 0 dB at zero delay; so does the
	// zero-delay cut at zero Doppler (|χ(0,0)| is the largest value).
	peaks := eval[[][]float64](t, ctx, `window.__pw.plots.charts.ambcuts.getOption().series.map((s) => s.data.reduce((a, b) => (b[1] > a[1] ? b : a)))`)
	if len(peaks) != 2 {
		t.Fatalf("%d cut series, want 2", len(peaks))
	}
	for i, p := range peaks {
		if p[1] != 0 || p[0] != 0 {
			t.Errorf("cut %d peaks at %v, want 0 dB at 0", i, p)
		}
	}
	shot(t, ctx, "cuts")
}

// A frame skipped because a newer one came within the same animation
// frame hands its full options on: the merges after them need them.
func TestSkippedFrameKeepsFullOptions(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	got := eval[string](t, ctx, `import('/js/charts.js').then(({ carryCharts }) => {
		const full = (n) => ({ replace: true, option: { n } }), merge = (n) => ({ replace: false, option: { n } });
		const show = (c) => Object.keys(c).sort().map((k) => k + ':' + [c[k]].flat().map((e) => (e.replace ? 'R' : 'm') + e.option.n).join('')).join(' ');
		return [
			show(carryCharts({ profile: full(1), response: full(2) }, { profile: merge(3) })),
			show(carryCharts({ profile: merge(1) }, { profile: merge(2) })),
			show(carryCharts({ profile: full(1) }, { profile: full(2) })),
			show(carryCharts(carryCharts({ profile: full(1) }, { profile: merge(2) }), { profile: merge(3), echo: full(4) })),
		].join(' | '); })`)
	want := "profile:R1m3 response:R2 | profile:m1m2 | profile:R2 | echo:R4 profile:R1m2m3"
	if got != want {
		t.Errorf("carried charts\n got %s\nwant %s", got, want)
	}
}
