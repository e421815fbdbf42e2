package web_test

import (
	"fmt"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestAddressFollowsWhenEditsRest: the address bar takes the shown
// scene's link once the edits rest, not once per edit (each write cost
// the page its style and layout and the browser a URL update, on the way
// of the next edit), and a reload made before it is written still opens
// the scene on the plots.
func TestAddressFollowsWhenEditsRest(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the start scene's address", fresh+` && location.hash === window.__pw.frame().link.slice(window.__pw.frame().link.indexOf('#'))`)
	// Count the writes of the address from here on.
	eval[bool](t, ctx, countWrites)
	rcs := eval[float64](t, ctx, `window.__pw.store.scenario.targets[0].rcs_dbsm`)
	const nudges = 6
	for i := range nudges {
		eval[bool](t, ctx, `(window.__nudgedAt = performance.now(), window.__pw.editor.nudge(0, 1), true)`)
		waitFor(t, ctx, fmt.Sprintf("nudge %d shown", i+1), fmt.Sprintf(`window.__pw.store.scenario.targets[0].rcs_dbsm === %g && `, rcs+float64(i+1))+fresh)
	}
	// On a quiet machine none is written; on a busy one a nudge may come
	// more than AddressMs after the last, but never is one written sooner.
	w := eval[[]float64](t, ctx, `window.__addressWrites`)
	for _, after := range w {
		if after < 500 {
			t.Errorf("the address was written %.0f ms after a nudge; want it only once the edits rest (600 ms)", after)
		}
	}
	t.Logf("%d writes of the address during %d nudges, each waited for", len(w), nudges)
	// A reload now, before the address follows, opens the shown scene.
	do(t, ctx, chromedp.Reload())
	waitFor(t, ctx, "the reloaded scene", fmt.Sprintf(`window.__pw && window.__pw.store.scenario && window.__pw.store.scenario.targets[0].rcs_dbsm === %g && `, rcs+nudges)+fresh)
	waitFor(t, ctx, "the reloaded scene's address", `location.hash === window.__pw.frame().link.slice(window.__pw.frame().link.indexOf('#'))`)
	// Resting, the address follows once.
	eval[bool](t, ctx, countWrites)
	for i := range 3 {
		eval[bool](t, ctx, `(window.__nudgedAt = performance.now(), window.__pw.editor.nudge(0, -1), true)`)
		waitFor(t, ctx, fmt.Sprintf("nudge down %d shown", i+1), fmt.Sprintf(`window.__pw.store.scenario.targets[0].rcs_dbsm === %g && `, rcs+nudges-float64(i+1))+fresh)
	}
	waitFor(t, ctx, "the address of the rested scene", `location.hash === window.__pw.frame().link.slice(window.__pw.frame().link.indexOf('#'))`)
	if n := len(eval[[]float64](t, ctx, `window.__addressWrites`)); n < 1 || n > 3 {
		t.Errorf("the address was written %d times for 3 nudges and a rest, want 1 (a few on a busy machine)", n)
	}
	// A plain reload gives the same scene.
	do(t, ctx, chromedp.Reload())
	waitFor(t, ctx, "the scene after a second reload", fmt.Sprintf(`window.__pw && window.__pw.store.scenario && window.__pw.store.scenario.targets[0].rcs_dbsm === %g && `, rcs+nudges-3)+fresh)
	shot(t, ctx, "address-reloaded")
}

// countWrites wraps the page's history writes: window.__addressWrites
// lists, for each, the ms since window.__nudgedAt.
const countWrites = `(() => { window.__addressWrites = []; window.__nudgedAt = -Infinity; for (const k of ['replaceState', 'pushState']) {
	const f = history[k].bind(history); history[k] = (...a) => { window.__addressWrites.push(performance.now() - window.__nudgedAt); return f(...a); }; } return true; })()`
