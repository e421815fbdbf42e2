package web_test

import (
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// jsLegendPaged is the page counter ("1/2") a chart's scrolling legend
// draws when its entries do not fit one row, or "" when they do.
const jsLegendPaged = `((name) => {
	const zr = window.__pw.plots.charts[name].getZr();
	for (const el of zr.storage.getDisplayList(true)) {
		if (!el.invisible && !el.ignore && el.style && /^\d+\/\d+$/.test(String(el.style.text || '').trim())) return el.style.text;
	}
	return ''; })`

// TestProfileLegendWhole: at 1280×720 the profile's legend shows every
// entry on every demo, pinned or not: on the pulse-train scene the last
// entries went behind a pager ("1/2"), the masking entry cut to its bare
// icon.
func TestProfileLegendWhole(t *testing.T) {
	ctx := mustBrowserFor(t, 180*time.Second)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	demos := eval[[]string](t, ctx, `fetch('/api/v1/demos').then((r) => r.json()).then((d) => d.map((x) => x.name))`)
	for _, d := range demos {
		loadDemo(t, ctx, d)
		waitFor(t, ctx, d+" drawn", fresh+` && window.__pw.plots.charts.profile.getOption().legend.length > 0`)
		if p := eval[string](t, ctx, jsLegendPaged+`('profile')`); p != "" {
			t.Errorf("%s: the profile's legend is paged (%s): %v", d, p, eval[[]string](t, ctx, `window.__pw.plots.charts.profile.getOption().series.map((s) => s.name)`))
			shot(t, ctx, d)
		}
		do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-pin`)))
		waitFor(t, ctx, d+" pinned", fresh+` && !!window.__pw.frame().reference && window.__pw.plots.charts.profile.getOption().series.some((s) => s.id === 'reference')`)
		if p := eval[string](t, ctx, jsLegendPaged+`('profile')`); p != "" {
			t.Errorf("%s pinned: the profile's legend is paged (%s): %v", d, p, eval[[]string](t, ctx, `window.__pw.plots.charts.profile.getOption().series.map((s) => s.name)`))
			shot(t, ctx, d+"-pinned")
		}
		do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-pin`)))
		waitFor(t, ctx, d+" unpinned", fresh+` && !window.__pw.frame().reference`)
	}
	loadDemo(t, ctx, "hill-clutter-doppler")
	shot(t, ctx, "")
}
