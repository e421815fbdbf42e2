package web_test

import (
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestClutterOnPage: rain is clutter, never detected; a fixed threshold
// lets it break through, and the false alarms show on its card and as
// shaded spans on the profile; its role can be set to target; an
// extended surface given by γ needs the antenna height.
func TestClutterOnPage(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "squall-line")
	waitFor(t, ctx, "the rain as clutter", jsTarget+`('rain-band') && `+jsTarget+`('rain-band').status === 'clutter'`)
	card := `document.querySelector('.tcard[data-target="rain-band"]')`
	waitFor(t, ctx, "the rain's card", card+` && `+card+`.textContent.includes('no breakthrough')`)
	plane := eval[string](t, ctx, `document.querySelector('.tcard[data-target="light-aircraft"]').textContent`)
	if !strings.Contains(plane, "CNR") || !strings.Contains(plane, "SCR") {
		t.Errorf("the aircraft's card lacks CNR and SCR: %q", plane)
	}
	if s := eval[string](t, ctx, `document.querySelector('.clutter-sum').textContent`); !strings.Contains(s, "False alarms from noise") || !strings.Contains(s, "independent cells") {
		t.Errorf("false-alarm summary: %q", s)
	}
	shot(t, ctx, "cfar")

	// A fixed threshold: the rain breaks through.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	setSelect(t, ctx, `select[data-action="detector-kind"]`, "fixed")
	waitFor(t, ctx, "breakthrough", jsTarget+`('rain-band').breakthrough && `+jsTarget+`('rain-band').breakthrough.cells > 0`)
	waitFor(t, ctx, "the shaded spans", `(() => { const o = window.__pw.plots.charts.profile.getOption();
		const s = o.series.find((x) => x.id === 'breakthrough'); return s && s.markArea && s.markArea.data.length > 0; })()`)
	waitFor(t, ctx, "the card's false alarms", card+`.textContent.includes('false-alarm cell')`)
	if st := eval[string](t, ctx, jsTarget+`('rain-band').status`); st != "clutter" {
		t.Errorf("rain under a fixed threshold: %s, want clutter (never detected)", st)
	}
	shot(t, ctx, "fixed")

	// As a target, the rain is judged like one.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="scene"]`)),
		chromedp.Click(chromedp.CSS(`tr[data-row="1"] input.id`)))
	role := `select[data-path="targets[1].role"]`
	waitFor(t, ctx, "the role menu", `!!document.querySelector('`+role+`')`)
	setSelect(t, ctx, role, "target")
	waitFor(t, ctx, "the rain judged as a target", jsTarget+`('rain-band').status === 'detected' && !`+jsTarget+`('rain-band').breakthrough`)

	// A new extended target, given by γ: the antenna height is required.
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-act="add"]`)))
	waitFor(t, ctx, "the new row", `document.querySelectorAll('#ed-targets tr[data-row]').length === 3`)
	setSelect(t, ctx, `tr[data-row="2"] select.kind`, "extended")
	waitFor(t, ctx, "the surface menu", `!!document.querySelector('select.surface-form')`)
	setSelect(t, ctx, `select.surface-form`, "gamma_db")
	const gErr = `document.querySelector('[data-err-for="targets[2].gamma_db"]')`
	waitFor(t, ctx, "the γ error", gErr+` && `+gErr+`.textContent.includes('antenna_height_m')`)
	shot(t, ctx, "gamma-error")
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="radar"]`)))
	typeInto(t, ctx, `input[data-path="radar.antenna_height_m"]`, "100") // horizon 41 km, beyond the new target at 22 km
	waitFor(t, ctx, "the γ surface evaluated", jsTarget+`('target') && `+jsTarget+`('target').grazing_deg > 0`)
	// The cards follow the plots after their paint: wait for them.
	waitFor(t, ctx, "the surface's card with σ⁰ and ψ", `(() => { const c = document.querySelector('.tcard[data-target="target"]'); return !!c && c.textContent.includes('σ⁰') && c.textContent.includes('ψ'); })()`)
	shot(t, ctx, "gamma")
	do(t, ctx, chromedp.ScrollIntoView(chromedp.CSS(`.clutter-sum`)))
	shot(t, ctx, "cards")
}
