package web_test

import (
	"fmt"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestFiguresPanelUpdatesInPlace: wheel notches over a marker (real input
// events) change that target's SNR; the figures panel shows the new
// numbers in the same elements it showed the old ones in (morph.js),
// rather than replacing the panel's nodes on every frame, and its text
// equals the panel built afresh from the same report.
func TestFiguresPanelUpdatesInPlace(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the start scene", jsMarker+`('skiff')`)
	waitFor(t, ctx, "in step", fresh)
	// Tag the skiff's card and its SNR element, and remember the text.
	eval[bool](t, ctx, `(() => { const c = document.querySelector('#figures li.tcard[data-target="skiff"]');
		window.__card = c; window.__nums = c.querySelector('.tcard-nums'); window.__first = document.querySelector('#figures').firstChild;
		window.__snr0 = c.textContent; return true; })()`)
	s0 := eval[float64](t, ctx, `window.__pw.store.scenario.targets[1].rcs_dbsm`)
	p := markerPx(t, ctx, "skiff")
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	mouse(t, ctx, chromedp.MouseMoved, ox+p[0], oy+p[1])
	for range 4 {
		wheelAt(t, ctx, ox+p[0], oy+p[1], -100)
		time.Sleep(60 * time.Millisecond)
	}
	waitFor(t, ctx, "four notches", fmt.Sprintf(`window.__pw.store.scenario.targets[1].rcs_dbsm === %g`, s0+4))
	waitFor(t, ctx, "the panel shows the new frame", fresh+` && document.querySelector('#figures li.tcard[data-target="skiff"]').textContent !== window.__snr0`)
	same := eval[map[string]bool](t, ctx, `(() => { const c = document.querySelector('#figures li.tcard[data-target="skiff"]');
		return {card: c === window.__card, nums: c.querySelector('.tcard-nums') === window.__nums,
			first: document.querySelector('#figures').firstChild === window.__first}; })()`)
	for what, ok := range same {
		if !ok {
			t.Errorf("the figures panel replaced its %s element instead of updating it in place", what)
		}
	}
	// The text in place is what a panel built afresh from the report shows.
	match := eval[bool](t, ctx, `import('/js/figures.js').then(({ renderFigures }) => {
		const d = document.createElement('div'); const f = window.__pw.frame();
		renderFigures(d, f.report, null, f.compute_ms);
		return d.textContent === document.querySelector('#figures').textContent; })`)
	if !match {
		t.Error("the figures panel updated in place does not read as the panel built afresh from the same report")
	}
	shot(t, ctx, "panel")
}
