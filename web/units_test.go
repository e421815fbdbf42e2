package web_test

import (
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// The units control, with real key and mouse events: the page shows and
// accepts nautical miles and knots while the scenario, its link and the
// server keep metres and m/s exactly. The conversions are the exact
// definitions: 1 nmi = 1852 m (International Hydrographic Conference,
// Monaco 1929; BIPM SI Brochure, 9th ed., Table 8) and 1 kt = 1852/3600
// m/s (the same sources).

func TestUnitsNauticalRoundTrip(t *testing.T) {
	ctx := mustBrowser(t)
	url := mustServer(t)
	openPage(t, ctx, url)

	// Open the control with a click and choose nmi and kt with the keyboard.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	do(t, ctx, chromedp.Focus(chromedp.CSS(`select[data-units="range"]`)), chromedp.SendKeys(chromedp.CSS(`select[data-units="range"]`), "nmi"))
	do(t, ctx, chromedp.Focus(chromedp.CSS(`select[data-units="speed"]`)), chromedp.SendKeys(chromedp.CSS(`select[data-units="speed"]`), "kt"))
	waitFor(t, ctx, "the table in nmi and kt", `document.querySelector('table.targets thead').textContent.includes('(nmi)') && document.querySelector('table.targets thead').textContent.includes('(kt, opening +)')`)
	shot(t, ctx, "picked")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`))) // closes the control

	// The skiff at 6300 m shows as 6300/1852 nmi (12 significant digits).
	const skiffRange = `tr[data-row="1"] input[data-path="targets[1].range_m"]`
	const skiffRate = `tr[data-row="1"] input[data-path="targets[1].range_rate_mps"]`
	if got := eval[string](t, ctx, `document.querySelector('`+skiffRange+`').value`); got != "3.40172786177" {
		t.Errorf("skiff range field = %q, want 3.40172786177 (6300 m / 1852)", got)
	}
	// −2 m/s is −2·3600/1852 kt.
	if got := eval[string](t, ctx, `document.querySelector('`+skiffRate+`').value`); got != "-3.88768898488" {
		t.Errorf("skiff rate field = %q, want -3.88768898488 (−2 m/s · 3600/1852)", got)
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
	waitFor(t, ctx, "the range error in nmi", `(document.querySelector('[data-err-for="targets[1].range_m"]') || {}).textContent.includes('99999 nmi is above the maximum 53995.7 nmi')`)
	shot(t, ctx, "error")
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
	do(t, ctx, chromedp.Focus(chromedp.CSS(`select[data-units="rate"]`)), chromedp.SendKeys(chromedp.CSS(`select[data-units="rate"]`), "positive when closing"))
	waitFor(t, ctx, "the rate field closing positive", `document.querySelector('`+skiffRate+`').value === '10'`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`)))
	typeInto(t, ctx, skiffRate, "12")
	waitFor(t, ctx, "12 kt closing held as −12·1852/3600 m/s", `window.__pw.store.scenario.targets[1].range_rate_mps === -12*1852/3600`)
	shot(t, ctx, "closing")

	// Reload: the choice stays with the browser.
	want := eval[string](t, ctx, `JSON.stringify(window.__pw.store.scenario)`)
	waitFor(t, ctx, "the link of the newest edit in the address bar", fresh+` && location.hash === window.__pw.frame().link.slice(window.__pw.frame().link.indexOf('#'))`)
	link := eval[string](t, ctx, `location.href`)
	do(t, ctx, chromedp.Reload())
	waitFor(t, ctx, "the page again", `window.__pw && window.__pw.frame() && window.__pw.frame().report`)
	if head := eval[string](t, ctx, `document.querySelector('table.targets thead').textContent`); !strings.Contains(head, "(nmi)") || !strings.Contains(head, "(kt, closing +)") {
		t.Errorf("after a reload the table heads read %q, want nmi and kt, closing +", head)
	}
	if got := eval[string](t, ctx, `JSON.stringify(window.__pw.store.scenario)`); got != want {
		t.Errorf("after a reload the scenario is\n%s\nwant\n%s", got, want)
	}

	// A colleague with the page's defaults (a browser of their own) opens
	// the link: the same scenario, shown in metres and m/s.
	cctx, cancel := chromedp.NewContext(browserCtx, chromedp.WithNewBrowserContext())
	defer cancel()
	do(t, cctx, chromedp.Navigate(link))
	waitFor(t, cctx, "the colleague's page", `window.__pw && window.__pw.frame() && window.__pw.frame().report && window.__pw.store.scenario.targets[1].range_m === 6574.6`)
	if got := eval[string](t, cctx, `JSON.stringify(window.__pw.store.scenario)`); got != want {
		t.Errorf("the colleague's scenario is\n%s\nwant\n%s", got, want)
	}
	if got := eval[string](t, cctx, `document.querySelector('`+skiffRange+`').value`); got != "6574.6" {
		t.Errorf("the colleague's skiff range field = %q, want 6574.6 (m)", got)
	}
	if got := eval[string](t, cctx, `document.querySelector('`+skiffRate+`').value`); got != "-6.17333333333" {
		t.Errorf("the colleague's skiff rate field = %q, want -6.17333333333 (m/s, opening +)", got)
	}
	shot(t, cctx, "colleague")
}
