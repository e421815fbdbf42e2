package web_test

import (
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestSeaStateAndAirOnPage: the sea of the mast demo given by a sea state
// (the NRL sea model) is refused beyond the 0.1° grazing range with the
// valid span beside the far edge, then evaluated with σ⁰ and ψ on its
// card once the far edge is inside; the polarisation menu reaches the
// scenario; the path's air (ITU-R P.676) puts the atmosphere in the
// reasons.
func TestSeaStateAndAirOnPage(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "sea-clutter-mast")
	do(t, ctx, chromedp.Click(chromedp.CSS(`tr[data-row="0"] input.id`)))
	waitFor(t, ctx, "the surface menu", `!!document.querySelector('select.surface-form')`)
	setSelect(t, ctx, `select.surface-form`, "sea_state")
	waitFor(t, ctx, "the sea state in the scenario", `window.__pw.store.scenario.targets[0].sea_state === 3 && window.__pw.store.scenario.targets[0].gamma_db === undefined`)
	// The mast is 25 m high: the grazing angle falls to 0.1° at 10.6 km,
	// nearer than the sea's far edge at 16 km.
	const stopErr = `document.querySelector('[data-err-for="targets[0].range_stop_m"]')`
	waitFor(t, ctx, "the far-edge error", stopErr+` && `+stopErr+`.textContent.includes('below the 0.1°')`)
	if msg := eval[string](t, ctx, stopErr+`.textContent`); !strings.Contains(msg, "10.56 km") {
		t.Errorf("far-edge message %q lacks the 0.1° range", msg)
	}
	shot(t, ctx, "sea-error")
	typeInto(t, ctx, `input[data-path="targets[0].range_stop_m"]`, "10000")
	// Typing sends a frame per key (1, 10, 100, …); read σ⁰ from the
	// frame of the whole value only, settled.
	waitFor(t, ctx, "the sea evaluated", fresh+` && window.__pw.store.scenario.targets[0].range_stop_m === 10000 && `+jsTarget+`('sea') && `+jsTarget+`('sea').grazing_deg > 0 && `+jsTarget+`('sea').sigma0_db !== undefined`)
	waitFor(t, ctx, "the sea's card with σ⁰ and ψ", `(() => { const c = document.querySelector('.tcard[data-target="sea"]'); return !!c && c.textContent.includes('σ⁰') && c.textContent.includes('ψ'); })()`)
	h := eval[float64](t, ctx, jsTarget+`('sea').sigma0_db`)
	setSelect(t, ctx, `select[data-path="targets[0].polarisation"]`, "vertical")
	waitFor(t, ctx, "vertical polarisation evaluated", `window.__pw.store.scenario.targets[0].polarisation === 'vertical' && `+jsTarget+`('sea').sigma0_db > `+strconv.FormatFloat(h, 'g', -1, 64))
	shot(t, ctx, "sea")

	// The air on the path: 0.0131 dB/km at 9.41 GHz in the default air
	// (ITU-R P.676-13 Annex 1, testdata/golden/propagation.py), 0.24 dB
	// two-way to the trawler at 9 km.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	waitFor(t, ctx, "the front-end section", `document.querySelector('details.frontend') !== null`)
	if !eval[bool](t, ctx, `document.querySelector('details.frontend').open`) {
		do(t, ctx, chromedp.Click(chromedp.CSS(`details.frontend > summary`)))
	}
	setSelect(t, ctx, `select[data-path="propagation.gas"]`, "itu_p676")
	waitFor(t, ctx, "the air in the reasons", jsTarget+`('trawler') && `+jsTarget+`('trawler').reason.includes('The atmosphere attenuates its echo by 0.2 dB two-way')`)
	typeInto(t, ctx, `input[data-path="propagation.water_vapour_g_m3"]`, "20")
	waitFor(t, ctx, "wetter air", `window.__pw.store.scenario.propagation.water_vapour_g_m3 === 20 && `+jsTarget+`('trawler').reason.includes('20 g/m³')`)
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`document.querySelector('[data-path="propagation.gas"]').scrollIntoView()`))
	shot(t, ctx, "air")
}
