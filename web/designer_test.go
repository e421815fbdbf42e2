package web_test

import (
	"encoding/base64"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// The page tells the harbour scene's story on the plots themselves:
// named markers, the masking line labelled, the threshold named, and a
// double-click on the masked skiff zooms onto it and its masker.
func TestStoryLabelsAndFocus(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	label := eval[string](t, ctx, `(() => { const o = window.__pw.plots.charts.profile.getOption();
		const s = o.series.find((x) => x.id === 'masking'); const d = s && s.data.find((x) => x && x.label);
		return d ? d.label.formatter : ''; })()`)
	if label != "tanker's response masks skiff" {
		t.Errorf("masking label %q", label)
	}
	names := eval[[]string](t, ctx, `window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'markers').data.map((d) => d.name)`)
	if strings.Join(names, ",") != "tanker,skiff,pilot-boat" {
		t.Errorf("marker names %v", names)
	}
	shot(t, ctx, "labels")

	// Real keys in the profile's Focus list: typing "s" picks "skiff and
	// tanker (masks it)".
	do(t, ctx, chromedp.Focus(chromedp.CSS(`#focus-select`)), chromedp.KeyEvent("s"))
	waitFor(t, ctx, "the focused zoom", `window.__pw.plots.visibleRange() !== null`)
	r := eval[[]float64](t, ctx, `window.__pw.plots.visibleRange()`)
	// Tanker at 6000 m, skiff at 6300 m: the span holds both, with 150 m
	// (half their distance) each side; the window is 3.5–9 km.
	if !(r[0] < 6000 && r[1] > 6300 && r[1]-r[0] < 700) {
		t.Errorf("focused range %v m, want about [5850, 6450]", r)
	}
	waitFor(t, ctx, "the echo following", `(() => { const a = window.__pw.plots.charts.echo.getModel().getComponent('xAxis', 0).axis.scale.getExtent(); return a[1] - a[0] < 700; })()`)
	shot(t, ctx, "focused")

	// A target masked by its own sidelobes is listed alone, not "pilot-boat
	// and pilot-boat (masks it)".
	for _, o := range eval[[]string](t, ctx, `[...document.querySelectorAll('#focus-select option')].map((o) => o.textContent)`) {
		if strings.HasPrefix(o, "pilot-boat and pilot-boat") {
			t.Errorf("the Focus list offers %q", o)
		}
	}
	// Back to the whole window with the keyboard (↓ from "Focus…" picks
	// "whole window"), then a real double-click on the skiff's marker does
	// the same zoom.
	do(t, ctx, chromedp.Focus(chromedp.CSS(`#focus-select`)), chromedp.KeyEvent(kb.ArrowDown))
	waitFor(t, ctx, "the whole window", `window.__pw.plots.visibleRange() === null || window.__pw.plots.visibleRange()[1] - window.__pw.plots.visibleRange()[0] > 5000`)
	waitFor(t, ctx, "the markers on the whole window", fresh+` && `+jsMarker+`('skiff')`)
	p := markerPx(t, ctx, "skiff")
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	mouse(t, ctx, chromedp.MouseMoved, ox+p[0], oy+p[1])
	for n := 1; n <= 2; n++ {
		mouse(t, ctx, chromedp.MousePressed, ox+p[0], oy+p[1], chromedp.ButtonLeft, chromedp.ClickCount(n))
		mouse(t, ctx, chromedp.MouseReleased, ox+p[0], oy+p[1], chromedp.ButtonLeft, chromedp.ClickCount(n))
	}
	waitFor(t, ctx, "the double-click's zoom", `window.__pw.plots.visibleRange() !== null && window.__pw.plots.visibleRange()[1] - window.__pw.plots.visibleRange()[0] < 700`)
	r = eval[[]float64](t, ctx, `window.__pw.plots.visibleRange()`)
	if !(r[0] < 6000 && r[1] > 6300) {
		t.Errorf("double-click on the skiff: range %v m, want the skiff (6300 m) and the tanker (6000 m)", r)
	}
	if v := eval[float64](t, ctx, `window.__pw.store.scenario.targets[1].range_m`); v != 6300 {
		t.Errorf("the double-click moved the skiff to %g m", v)
	}
	shot(t, ctx, "double-click")
}

// The designer's tabs show the pulse, the spectrum with its occupied band,
// the filter's taps and the Doppler tolerance, each opened by a real click.
func TestDesignerTabs(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	for _, c := range []struct{ tab, series string }{
		{"pulse", "frequency"}, {"pulse", "spectrum"}, {"filter", "tap-amplitude"}, {"filter", "doppler-loss"},
	} {
		sel := fmt.Sprintf(`.plot-head [data-show=%q]`, c.tab)
		do(t, ctx, chromedp.Click(chromedp.CSS(sel)))
		waitFor(t, ctx, c.tab+" drawn", fmt.Sprintf(`(() => { const o = window.__pw.plots.charts[%q].getOption();
			const s = o && o.series && o.series.find((x) => x.id === %q); return !!s && s.data.length > 10; })()`, c.tab, c.series))
		shot(t, ctx, c.tab)
	}
	// The LFM's instantaneous frequency runs from −B/2 to +B/2 (±5 MHz).
	f := eval[[]float64](t, ctx, `(() => { const d = window.__pw.plots.charts.pulse.getOption().series.find((x) => x.id === 'frequency').data;
		return [d[0][1], d[d.length - 1][1]]; })()`)
	if math.Abs(f[0]+5) > 0.05 || math.Abs(f[1]-5) > 0.05 {
		t.Errorf("frequency from %g to %g MHz, want −5 to +5", f[0], f[1])
	}
	// The card names each moving target's Doppler shift and peak shift.
	card := eval[string](t, ctx, `document.querySelector('[data-target="skiff"] .dop').textContent`)
	if !strings.Contains(card, "Doppler +") || !strings.Contains(card, "peak shift") {
		t.Errorf("skiff's card: %q", card)
	}
}

// The Response plot opens on the main lobe and zooms further with a real
// wheel turn.
func TestResponseOpensNearAndWheelZooms(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	extent := `(() => { const a = window.__pw.plots.charts.response.getModel().getComponent('xAxis', 0).axis.scale.getExtent(); return [a[0], a[1]]; })()`
	waitFor(t, ctx, "the response", `window.__pw.plots.charts.response.getOption() && window.__pw.plots.charts.response.getOption().series.length > 0`)
	r := eval[[]float64](t, ctx, extent)
	lobe := eval[float64](t, ctx, `window.__pw.frame().report.waveform.mainlobe_3db_m`)
	if math.Abs(r[1]-12*lobe) > 1 || math.Abs(r[0]+12*lobe) > 1 {
		t.Errorf("response opens on [%g, %g] m, want ±12 main lobes (±%g m)", r[0], r[1], 12*lobe)
	}
	ox, oy := chartOrigin(t, ctx, "#chart-response")
	w := eval[float64](t, ctx, `window.__pw.plots.charts.response.getWidth()`)
	h := eval[float64](t, ctx, `window.__pw.plots.charts.response.getHeight()`)
	mouse(t, ctx, chromedp.MouseMoved, ox+w/2, oy+h/2)
	for range 3 {
		wheelAt(t, ctx, ox+w/2, oy+h/2, -120)
	}
	waitFor(t, ctx, "the wheel zoom", extent+`[1] - `+extent+`[0] < `+fmt.Sprint(0.9*(r[1]-r[0])))
	shot(t, ctx, "zoomed")
}

// The printable export carries a title band with the scene's name over the
// chart as drawn, without the zoom slider.
func TestPrintableExport(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	url := eval[string](t, ctx, `import('/js/export.js').then((m) => m.printablePNG(window.__pw.plots.charts.profile,
		{ title: window.__pw.store.scenario.name, subtitle: 'Compressed range profile' }))`)
	const head = "data:image/png;base64,"
	if !strings.HasPrefix(url, head) {
		t.Fatalf("export is %.40q", url)
	}
	png, err := base64.StdEncoding.DecodeString(url[len(head):])
	if err != nil {
		t.Fatal(err)
	}
	os.MkdirAll(outDir, 0o755)
	os.WriteFile(filepath.Join(outDir, "TestPrintableExport-profile.png"), png, 0o644)
	size := eval[[]float64](t, ctx, `(async () => { const i = new Image(); i.src = `+fmt.Sprintf("%q", url)+`; await i.decode();
		const c = window.__pw.plots.charts.profile; return [i.width, i.height, c.getWidth(), c.getHeight()]; })()`)
	if size[0] != 2*size[2] || size[1] != 2*size[3]+128 {
		t.Errorf("export %v×%v px, want the chart (%v×%v) at 2× under a 64 px band", size[0], size[1], size[2], size[3])
	}
}

// The range–Doppler map names each marker on a pale plate, and the map
// cuts carry a legend per plot.
func TestMapLabelsAndCutLegends(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	eval[bool](t, ctx, `(async () => { const s = await fetch('/api/v1/demos/hill-clutter-doppler').then((r) => r.json()); window.__pw.store.load(s); return true; })()`)
	waitFor(t, ctx, "the map", fresh+` && window.__pw.frame().report.scenario === window.__pw.store.scenario.name && window.__pw.plots.charts.rdmap.getOption() && window.__pw.plots.charts.rdmap.getOption().series.length > 1`)
	lab := eval[map[string]any](t, ctx, `(() => { const s = window.__pw.plots.charts.rdmap.getOption().series.find((x) => x.id === 'markers');
		return { show: s.label.show, plate: s.label.backgroundColor || '', names: s.data.map((d) => d.name).join(',') }; })()`)
	if lab["show"] != true || lab["plate"] == "" || lab["names"] != "ridge,helicopter,jet,car" {
		t.Errorf("map marker labels %v", lab)
	}
	// A real click on the map asks for cuts; their chart has two legends.
	ox, oy := chartOrigin(t, ctx, "#chart-rdmap")
	w := eval[float64](t, ctx, `window.__pw.plots.charts.rdmap.getWidth()`)
	h := eval[float64](t, ctx, `window.__pw.plots.charts.rdmap.getHeight()`)
	x, y := ox+w*0.4, oy+h*0.45
	mouse(t, ctx, chromedp.MouseMoved, x, y)
	mouse(t, ctx, chromedp.MousePressed, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	mouse(t, ctx, chromedp.MouseReleased, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	waitFor(t, ctx, "the cuts", `(() => { const o = window.__pw.plots.charts.rdcuts.getOption(); return !!o && o.series && o.series.length === 4; })()`)
	n := eval[int](t, ctx, `window.__pw.plots.charts.rdcuts.getOption().legend.filter((l) => l.show !== false).length`)
	if n != 2 {
		t.Errorf("map cuts have %d legends, want one per plot", n)
	}
	shot(t, ctx, "cuts")
}

// jsCatchDownloads records the page's downloads (name and address) in
// window.__downloads instead of saving them, and the text drawn on any
// canvas in window.__drawn.
const jsCatchDownloads = `(() => {
	window.__downloads = []; window.__drawn = [];
	document.addEventListener('click', (e) => {
		const a = e.target.closest && e.target.closest('a[download]');
		if (a) { window.__downloads.push({ name: a.download, href: a.href }); e.preventDefault(); }
	}, true);
	const fill = CanvasRenderingContext2D.prototype.fillText;
	CanvasRenderingContext2D.prototype.fillText = function (text, ...rest) { window.__drawn.push(String(text)); return fill.call(this, text, ...rest); };
	return true; })()`

// TestPNGButtons: a real click on each plot's PNG button saves a PNG of
// the plot shown, titled with the scene's whole name (a smaller type on a
// narrow plot) and named for that plot: the profile, a lower plot's shown
// tab, and the first CPI map of a PRF schedule; a CPI maps tab without
// maps says there is nothing to save.
func TestPNGButtons(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "long-pulse-blind")
	waitFor(t, ctx, "settled", fresh)
	eval[bool](t, ctx, jsCatchDownloads)
	scene := "Long pulse: blind near range and folded echoes"
	save := func(button, wantName, wantSub string) {
		t.Helper()
		eval[bool](t, ctx, `(window.__downloads.length = 0, window.__drawn.length = 0, true)`)
		do(t, ctx, chromedp.Click(chromedp.CSS(button)))
		waitFor(t, ctx, "the download of "+wantName, `window.__downloads.length === 1`)
		d := eval[map[string]string](t, ctx, `window.__downloads[0]`)
		const head = "data:image/png;base64,"
		if d["name"] != wantName || !strings.HasPrefix(d["href"], head) {
			t.Errorf("%s saved %q (%.30s…), want %s as a PNG", button, d["name"], d["href"], wantName)
		} else if png, err := base64.StdEncoding.DecodeString(d["href"][len(head):]); err == nil {
			// The saved picture, kept beside the screenshots.
			os.MkdirAll(outDir, 0o755)
			os.WriteFile(filepath.Join(outDir, "TestPNGButtons-"+wantName), png, 0o644)
		}
		drawn := eval[[]string](t, ctx, `window.__drawn`)
		var title, sub bool
		for _, s := range drawn {
			title = title || s == scene
			sub = sub || strings.HasPrefix(s, wantSub+" · Pulsewright · ") && strings.HasSuffix(s, " UTC")
		}
		if !title || !sub {
			t.Errorf("%s: the picture's band lacks the title or the subtitle %q (drawn: %q)", button, wantSub, drawn)
		}
	}
	save(`button[data-png="profile"]`, "Long-pulse-blind-near-range-and-folded-echoes-profile.png", "Compressed range profile")
	save(`#panel-right button.png`, "Long-pulse-blind-near-range-and-folded-echoes-response.png", "Response")
	// This schedule's CPIs are single pulses: no maps, nothing to save.
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="cpimaps"]`)))
	waitFor(t, ctx, "the CPI maps tab", `document.querySelector('#cpimaps').classList.contains('on')`)
	eval[bool](t, ctx, `(window.__downloads.length = 0, true)`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#panel-left button.png`)))
	waitFor(t, ctx, "the nothing-to-save notice", `!document.querySelector('#notice').hidden && document.querySelector('#notice-text').textContent.includes('no plot to save')`)
	if n := eval[int](t, ctx, `window.__downloads.length`); n != 0 {
		t.Errorf("an empty CPI maps tab saved %d files", n)
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`#notice-close`)))

	// A pulse-train schedule: the CPI maps, opened by a real click, come
	// from the server, and the PNG button saves the first.
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "settled", fresh)
	scene = "Low flyer over hill clutter, seen in Doppler"
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="echo"]`)), chromedp.Click(chromedp.CSS(`[data-show="cpimaps"]`)))
	waitFor(t, ctx, "the CPI maps", `(() => { const c = window.__pw.plots.charts.cpimap1; const o = c && c.getOption(); return !!o && o.series.length > 0 && !document.querySelector('.cpi-map[data-cpi="1"]').hidden; })()`)
	save(`#panel-left button.png`, "Low-flyer-over-hill-clutter-seen-in-Doppler-cpimap1.png", "CPI 1 range–Doppler map")
	shot(t, ctx, "cpimaps")
}
