package web_test

import (
	"testing"

	"github.com/chromedp/chromedp"
)

// TestFocusFoldedTarget: "Focus" on a folded target zooms the profile
// onto its marker, the ghost at the apparent range, where its echo shows.
func TestFocusFoldedTarget(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "long-pulse-blind")
	waitFor(t, ctx, "the folded airliner", fresh+` && `+jsTarget+`('airliner-far').status === 'folded' && !!document.querySelector('#focus-select option[value="airliner-far"]')`)
	// Picked from the list (rebuilt with each new list of targets, so
	// set and fired in one go).
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`(() => { const s = document.querySelector('#focus-select');
		s.focus(); s.value = 'airliner-far'; s.dispatchEvent(new Event('change', {bubbles: true})); })()`))
	waitFor(t, ctx, "the zoom", `window.__pw.plots.visibleRange() !== null`)
	v := eval[[]float64](t, ctx, `window.__pw.plots.visibleRange()`)
	x := eval[float64](t, ctx, jsMarker+`('airliner-far').value[0]`)
	if !(v[0] < x && x < v[1]) || v[1]-v[0] > 20000 {
		t.Errorf("focus on airliner-far shows %.0f … %.0f m; its marker (the ghost) is at %.0f m", v[0], v[1], x)
	}
	shot(t, ctx, "")
}
