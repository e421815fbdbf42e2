package web_test

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The units control, with real key and mouse events: the page shows and
// accepts nautical miles and knots while the scenario, its link and the
// server keep metres and m/s exactly. The conversions are the exact
// definitions: 1 nmi = 1852 m (International Hydrographic Conference,
// Monaco 1929; BIPM SI Brochure, 9th ed., Table 8) and 1 kt = 1852/3600
// m/s (the same sources).

// pickDown chooses an option of one of the units lists with the
// keyboard: the focus on the list, then ↓ n times.
func pickDown(t *testing.T, ctx context.Context, list string, n int) {
	t.Helper()
	sel := fmt.Sprintf(`select[data-units=%q]`, list)
	do(t, ctx, chromedp.Focus(chromedp.CSS(sel)))
	for range n {
		do(t, ctx, chromedp.KeyEvent(kb.ArrowDown))
	}
}

func TestUnitsNauticalRoundTrip(t *testing.T) {
	ctx := mustBrowserFor(t, 180*time.Second) // many edits, a reload and a second browser
	url := mustServer(t)
	openPage(t, ctx, url)

	// Open the control with a click and choose nmi and kt with the keyboard.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	pickDown(t, ctx, "range", 2) // m, km, nmi
	pickDown(t, ctx, "speed", 2) // m/s, km/h, kt
	waitFor(t, ctx, "the table in nmi and kt", `document.querySelector('table.targets thead').textContent.includes('(nmi)') && document.querySelector('table.targets thead').textContent.includes('Rate(kt)')`)
	shot(t, ctx, "picked")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`))) // closes the control

	// The skiff at 6300 m shows as 6300/1852 nmi: 6 significant digits in
	// the table (whole in their cells), 12 in the selected target's form.
	const skiffRange = `tr[data-row="1"] input[data-path="targets[1].range_m"]`
	const skiffRate = `tr[data-row="1"] input[data-path="targets[1].range_rate_mps"]`
	if got := eval[string](t, ctx, `document.querySelector('`+skiffRange+`').value`); got != "3.40173" {
		t.Errorf("skiff range cell = %q, want 3.40173 (6300 m / 1852)", got)
	}
	// −2 m/s is −2·3600/1852 kt.
	if got := eval[string](t, ctx, `document.querySelector('`+skiffRate+`').value`); got != "-3.88769" {
		t.Errorf("skiff rate cell = %q, want -3.88769 (−2 m/s · 3600/1852)", got)
	}
	tableWhole(t, ctx, "in nmi and kt")
	do(t, ctx, chromedp.Click(chromedp.CSS(`tr[data-row="1"] .kind`)), chromedp.KeyEvent(kb.Escape))
	waitFor(t, ctx, "the skiff's form", `document.querySelector('.detail-head').textContent.includes('skiff')`)
	if got := eval[string](t, ctx, `document.querySelector('#f-targets_1__range_m').value`); got != "3.40172786177" {
		t.Errorf("skiff range field = %q, want 3.40172786177", got)
	}
	// The profile's ticks are round in nmi: 2, 2.5, … 4.5 nmi over the
	// window 3500–9000 m (1.89–4.86 nmi).
	ticks := eval[[]string](t, ctx, `(() => { const c = window.__pw.plots.charts.profile; const a = c.getModel().getComponent('xAxis', 0);
		return (a.option.axisLabel.customValues || []).map((v) => a.option.axisLabel.formatter(v)); })()`)
	if strings.Join(ticks, " ") != "2 2.5 3 3.5 4 4.5" {
		t.Errorf("profile ticks = %q, want 2 … 4.5 nmi by 0.5", ticks)
	}

	// Typed in nmi, held in metres exactly: 3.55 nmi = 6574.6 m.
	typeInto(t, ctx, skiffRange, "3.55")
	waitFor(t, ctx, "the skiff at 6574.6 m in the scenario and the report",
		`window.__pw.store.scenario.targets[1].range_m === 6574.6 && `+jsTarget+`('skiff') && `+jsTarget+`('skiff').range_m === 6574.6`)
	// Typed in kt: −10 kt = −18520/3600 m/s, the double nearest to it.
	typeInto(t, ctx, skiffRate, "-10")
	waitFor(t, ctx, "the skiff at −10 kt", `window.__pw.store.scenario.targets[1].range_rate_mps === -18520/3600`)
	// A unit typed with the value wins: "9.5 km" in a field shown in nmi.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="radar"]`)))
	typeInto(t, ctx, `#f-radar_window_stop_m`, "9.5 km")
	waitFor(t, ctx, "the window stop at 9500 m", `window.__pw.store.scenario.radar.window_stop_m === 9500`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="scene"]`)))

	// "12x" is still refused, and the scene keeps the last value typed
	// ("12": 12 nmi = 22224 m).
	typeInto(t, ctx, skiffRange, "12x")
	waitFor(t, ctx, "the refusal", `(document.querySelector('[data-err-for="targets[1].range_m"]') || {}).textContent.includes('is not a number in nmi')`)
	if r := eval[float64](t, ctx, `window.__pw.store.scenario.targets[1].range_m`); r != 22224 {
		t.Errorf("after 12x the skiff's range is %v m, want 22224 (12 nmi, kept)", r)
	}
	// A value out of range: the server's message restated in nmi.
	typeInto(t, ctx, skiffRange, "99999")
	waitFor(t, ctx, "the range error in nmi", `(document.querySelector('[data-err-for="targets[1].range_m"]') || {}).textContent.includes('99999 nmi is above the maximum 53995.7 nmi (valid range 0 … 53995.7 nmi)')`)
	shot(t, ctx, "error")
	// A change of units restates the standing refusal: 99999 nmi is
	// 185198.148 km, the maximum 1e8 m is 100000 km.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	do(t, ctx, chromedp.Focus(chromedp.CSS(`select[data-units="range"]`)), chromedp.KeyEvent(kb.ArrowUp)) // km
	waitFor(t, ctx, "the range error in km", `(document.querySelector('[data-err-for="targets[1].range_m"]') || {}).textContent.includes('185198.148 km is above the maximum 100000 km (valid range 0 … 100000 km)')`)
	do(t, ctx, chromedp.KeyEvent(kb.ArrowDown)) // nmi again
	waitFor(t, ctx, "nmi again", `document.querySelector('table.targets thead').textContent.includes('(nmi)')`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`)))
	typeInto(t, ctx, skiffRange, "3.55")
	waitFor(t, ctx, "the error gone", `!document.querySelector('[data-err-for="targets[1].range_m"]').textContent && `+jsTarget+`('skiff').range_m === 6574.6`)

	// Figures, cards and axes follow: resolution in nmi, the profile's
	// range axis named in nmi.
	waitFor(t, ctx, "figures in nmi", `document.querySelector('#figures').textContent.includes('nmi') && !/\d m\b/.test(document.querySelector('#figures table').textContent)`)
	if name := eval[string](t, ctx, `window.__pw.plots.charts.profile.getOption().xAxis[0].name`); name != "range (nmi)" {
		t.Errorf("profile x axis = %q, want \"range (nmi)\"", name)
	}
	if lbl := eval[string](t, ctx, `window.__pw.plots.charts.profile.getOption().xAxis[0].axisLabel.formatter(7408)`); lbl != "4" {
		t.Errorf("profile tick at 7408 m = %q, want 4 (nmi)", lbl)
	}

	// Closing positive: the same scenario, the rate field's sign flips.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	pickDown(t, ctx, "rate", 1) // opening, closing
	waitFor(t, ctx, "the rate field closing positive", `document.querySelector('`+skiffRate+`').value === '10'`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`)))
	typeInto(t, ctx, skiffRate, "12")
	waitFor(t, ctx, "12 kt closing held as −12·1852/3600 m/s", `window.__pw.store.scenario.targets[1].range_rate_mps === -12*1852/3600`)
	tableWhole(t, ctx, "closing positive")
	shot(t, ctx, "closing")

	// Reload: the choice stays with the browser.
	want := eval[string](t, ctx, `JSON.stringify(window.__pw.store.scenario)`)
	waitFor(t, ctx, "the link of the newest edit in the address bar", fresh+` && location.hash === window.__pw.frame().link.slice(window.__pw.frame().link.indexOf('#'))`)
	link := eval[string](t, ctx, `location.href`)
	do(t, ctx, chromedp.Reload())
	waitFor(t, ctx, "the page again", `window.__pw && window.__pw.frame() && window.__pw.frame().report`)
	if head := eval[string](t, ctx, `document.querySelector('table.targets thead').textContent`); !strings.Contains(head, "(nmi)") || !strings.Contains(head, "Closing(kt)") {
		t.Errorf("after a reload the table heads read %q, want nmi and closing kt", head)
	}
	if got := eval[string](t, ctx, `JSON.stringify(window.__pw.store.scenario)`); got != want {
		t.Errorf("after a reload the scenario is\n%s\nwant\n%s", got, want)
	}

	// A colleague with the page's defaults opens the link: the same
	// scenario, shown in metres and m/s. The colleague's browser is this
	// tab with its stored choices wiped, not a second browser context:
	// creating a browser context while this tab is attached has tripped
	// the race detector inside the browser-driver library.
	cctx := ctx
	do(t, cctx, chromedp.Navigate("about:blank"))
	do(t, cctx, chromedp.Navigate(url))
	waitFor(t, cctx, "the page before the wipe", `window.__pw && window.__pw.frame()`)
	if n := eval[int](t, cctx, `(localStorage.clear(), localStorage.length)`); n != 0 {
		t.Fatalf("localStorage holds %d items after clear", n)
	}
	do(t, cctx, chromedp.Navigate("about:blank"))
	do(t, cctx, chromedp.Navigate(link))
	waitFor(t, cctx, "the colleague's page", `window.__pw && window.__pw.frame() && window.__pw.frame().report && window.__pw.store.scenario.targets[1].range_m === 6574.6`)
	if got := eval[string](t, cctx, `JSON.stringify(window.__pw.store.scenario)`); got != want {
		t.Errorf("the colleague's scenario is\n%s\nwant\n%s", got, want)
	}
	if got := eval[string](t, cctx, `document.querySelector('`+skiffRange+`').value`); got != "6574.6" {
		t.Errorf("the colleague's skiff range field = %q, want 6574.6 (m)", got)
	}
	if got := eval[string](t, cctx, `document.querySelector('`+skiffRate+`').value`); got != "-6.17333" {
		t.Errorf("the colleague's skiff rate cell = %q, want -6.17333 (m/s, opening +)", got)
	}
	tableWhole(t, cctx, "the colleague's, in m and m/s")
	shot(t, cctx, "colleague")
}

// tableWhole fails the test when a cell of the target table does not
// show its whole text (jsCut, table_test.go).
func tableWhole(t *testing.T, ctx context.Context, when string) {
	t.Helper()
	if cut := eval[[]string](t, ctx, jsCut); len(cut) > 0 {
		t.Errorf("%s: target table cells cut: %s", when, strings.Join(cut, "; "))
	}
}

// TestUnitsModuleExact checks the page's own conversions (units.js)
// against the exact definitions: 1 nmi = 1852 m (International
// Hydrographic Conference 1929; BIPM SI Brochure, 9th ed., Table 8),
// 1 kt = 1852/3600 m/s (the same), 1 km/h = 1000/3600 m/s, 1 ft = 0.3048 m
// (international yard and pound agreement, 1959). A typed decimal is
// converted exactly and rounded once: "12.3" nmi is the double nearest to
// 22779.6 m, where 12.3 × 1852 in floating point is 22779.600000000002.
func TestUnitsModuleExact(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	got := eval[[]string](t, ctx, `import('/js/units.js').then((u) => {
		const N = { range: 'nmi', speed: 'kt', height: 'ft', rate: 'opening' };
		const C = { range: 'km', speed: 'km/h', height: 'm', rate: 'closing' };
		const cases = [
			[u.parse('range', '1', N), 1852], [u.parse('range', '12.3', N), 22779.6], [u.parse('range', '0.1', N), 185.2],
			[u.parse('range', '12.5', N), 23150], [u.parse('range', '2 km', N), 2000], [u.parse('range', '3 NM', C), 5556],
			[u.parse('speed', '1', N), 1852 / 3600], [u.parse('speed', '10', N), 18520 / 3600], [u.parse('speed', '3.6', C), 1],
			[u.parse('rate', '10', N), 18520 / 3600], [u.parse('rate', '3.6', C), -1], [u.parse('rate', '-36', C), 10],
			[u.parse('height', '1', N), 0.3048], [u.parse('height', '1000', N), 304.8], [u.parse('height', '10000', N), 3048],
			[u.toUser('range', 1852 * 7, N), 7], [u.toUser('height', 3048, N), 10000], [u.toUser('rate', 1, C), -3.6],
			[u.fieldText('range', 22779.6, 12, N), '12.3'], [u.fieldText('speed', 18520 / 3600, 12, N), '10'],
			[String(u.parse('range', '12x', N)), 'NaN'], [String(u.parse('range', '1e', N)), 'NaN'], [String(u.parse('speed', '5 m', N)), 'NaN'],
			[String(u.parse('range', '', N)), 'undefined'],
			[u.qtyOf('antenna_height_m', 'm'), 'height'], [u.qtyOf('height_m', 'm'), 'height'], [u.qtyOf('range_m', 'm'), ''],
		];
		return cases.map(([a, b], i) => (a === b ? '' : i + ': ' + a + ' != ' + b)).filter(Boolean);
	})`)
	for _, g := range got {
		t.Errorf("units.js case %s", g)
	}
}

// A pulse train in km and km/h, closing positive: the range–Doppler map's
// axes are named and ticked in those units, its tooltip and the cuts'
// titles restated, while the map's data stay in SI.
func TestUnitsPulseTrain(t *testing.T) {
	ctx := mustBrowserFor(t, 120*time.Second)
	openPage(t, ctx, mustServer(t))
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	pickDown(t, ctx, "range", 1) // km
	pickDown(t, ctx, "speed", 1) // km/h
	pickDown(t, ctx, "rate", 1)  // closing
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`)))
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the map drawn", `(() => { const o = window.__pw.plots.charts.rdmap.getOption();
		return o.series && o.series.length >= 2 && o.series[0].data.length > 100; })()`)
	names := eval[[]string](t, ctx, `(() => { const o = window.__pw.plots.charts.rdmap.getOption(); return [o.xAxis[1].name, o.yAxis[1].name]; })()`)
	if names[0] != "range (km)" || names[1] != "closing rate (km/h)" {
		t.Errorf("map axes %q, want range (km) and closing rate (km/h)", names)
	}
	// Closing positive runs the rate axis downwards-negative: the value
	// axis and the heat map's category axis are both inverted, and back
	// when the convention is changed back (checked at the end).
	inv := `(() => { const o = window.__pw.plots.charts.rdmap.getOption(); return o.yAxis.map((a) => !!a.inverse).join(','); })()`
	if got := eval[string](t, ctx, inv); got != "true,true" {
		t.Errorf("map y axes inverse = %s, want true,true", got)
	}
	// Ticks: round km/h, and each label is minus the value in km/h of its
	// SI position (closing positive): v m/s is −3.6·v km/h.
	type tick struct {
		V     float64 `json:"v"`
		Label string  `json:"label"`
	}
	ticks := eval[[]tick](t, ctx, `(() => { const a = window.__pw.plots.charts.rdmap.getModel().getComponent('yAxis', 1);
		return (a.option.axisLabel.customValues || []).map((v) => ({v, label: a.option.axisLabel.formatter(v)})); })()`)
	if len(ticks) < 3 {
		t.Fatalf("map rate ticks %v, want round km/h ticks", ticks)
	}
	for _, tk := range ticks {
		want := -3.6 * tk.V
		var got float64
		if _, err := fmt.Sscan(tk.Label, &got); err != nil || math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) || math.Abs(got-math.Round(got/10)*10) > 1e-9 {
			t.Errorf("tick at %v m/s labelled %q, want %g km/h (a multiple of 10)", tk.V, tk.Label, want)
		}
	}
	// A zoom keeps round ticks: 6.1–6.9 km shows ticks a round fraction of
	// a km apart (0.1 or 0.2 km), at least three of them.
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`window.__pw.plots.charts.profile.dispatchAction({type: 'dataZoom', dataZoomIndex: 0, startValue: 6100, endValue: 6900})`))
	waitFor(t, ctx, "round ticks in the zoom", `(() => { const a = window.__pw.plots.charts.profile.getModel().getComponent('xAxis', 0);
		const v = a.option.axisLabel.customValues || []; const [lo, hi] = a.axis.scale.getExtent();
		return v.length >= 3 && v.every((x) => x >= lo - 1e-6 && x <= hi + 1e-6 && Math.abs(x / 100 - Math.round(x / 100)) < 1e-9); })()`)
	// The helicopter closes at about 25 m/s: its marker's tooltip says +90 km/h.
	tip := eval[string](t, ctx, `(() => { const p = window.__pw.plots; const m = p.charts.rdmap.getOption().series.find((s) => s.id === 'markers').data.find((d) => d.id === 'helicopter');
		return p.mapTip({seriesId: 'markers', data: m}); })()`)
	if !strings.Contains(tip, " km · +") || !strings.Contains(tip, " km/h\n") {
		t.Errorf("helicopter tooltip %q, want km and a positive (closing) km/h", tip)
	}
	// Cuts through a cell: the titles read in km and km/h.
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`window.__pw.session.sendCell({range_m: 7000, range_rate_mps: -25})`))
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`window.__pw.plots.select('rdcuts')`))
	waitFor(t, ctx, "the cuts", `(() => { const o = window.__pw.plots.charts.rdcuts.getOption(); return o && o.title && o.title.length === 2; })()`)
	titles := eval[[]string](t, ctx, `window.__pw.plots.charts.rdcuts.getOption().title.map((x) => x.text)`)
	if !strings.Contains(titles[0], "km/h") || strings.Contains(titles[0], "m/s") || !strings.Contains(titles[1], " km") {
		t.Errorf("cut titles %q, want km/h and km", titles)
	}
	shot(t, ctx, "")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	do(t, ctx, chromedp.Focus(chromedp.CSS(`select[data-units="rate"]`)), chromedp.KeyEvent(kb.ArrowUp)) // opening
	waitFor(t, ctx, "the map's axes upright again", inv+` === 'false,false' && window.__pw.plots.charts.rdmap.getOption().yAxis[1].name === 'range rate (km/h)'`)
}

// The page's restatement of the engine's sentences (units.js restate)
// agrees with the command line's (scenarios.Units.Restate), sentence by
// sentence, for each choice of units.
func TestUnitsRestateAgrees(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	sentences := []string{
		"only 3.2 m apart, inside the 87.8 m resolution, at 12.34 km",
		"Doppler saves it: at -5.0 m/s it sits 3 Doppler bins from ridge (+12.0 m/s), which masks it in a single pulse.",
		"They share its Doppler (0 bin apart at +0.0 m/s); blind speed 30.0 m/s; ±39.82 m/s",
		"10 dBsm at 3 ms, 20 µs, 5 m² and 10 MHz; the echo from 9999.0 m folds to 1234.5 m",
		"sea: 3 false-alarm cells over 1852–3704 m, 12.3–12.9 km; x5 m and 1.5e3 m",
	}
	for _, u := range []scenarios.Units{{Range: "nmi", Speed: "kt", Height: "ft", Rate: "closing"}, {Range: "km", Speed: "km/h", Height: "m", Rate: "opening"}, {Range: "m", Speed: "kt", Height: "m", Rate: "closing"}, scenarios.SIUnits()} {
		for _, text := range sentences {
			js := eval[string](t, ctx, fmt.Sprintf(`import('/js/units.js').then((m) => m.restate(%q, {range: %q, speed: %q, height: %q, rate: %q}))`, text, u.Range, u.Speed, u.Height, u.Rate))
			if goText := u.Restate(text); js != goText {
				t.Errorf("%v: %q\n page %q\n  cli %q", u, text, js, goText)
			}
		}
	}
}
