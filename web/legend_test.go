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

// TestFloorsLegendWhole: at 1280×720 the Floors tab's legend shows its
// entries on one row, above the plot: it went behind a pager of six
// pages ("1/6"), the second entry cut, and sat on the plot's top (the
// curves were drawn in a grid under it).
func TestFloorsLegendWhole(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	for _, d := range []string{"harbour-skiff", "rocky-coast", "hill-clutter-doppler"} {
		loadDemo(t, ctx, d)
		do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="floors"]`)))
		// The chart is this scene's: its title names one of its targets.
		waitFor(t, ctx, d+"'s floors", fresh+` && (() => { const o = window.__pw.plots.charts.floors.getOption();
			return !!o && o.series.length > 0 && window.__pw.frame().report.targets.some((t) => String(o.title[0].text).includes('of ' + t.id)); })()`)
		if p := eval[string](t, ctx, jsLegendPaged+`('floors')`); p != "" {
			t.Errorf("%s: the Floors legend is paged (%s): %v", d, p, eval[any](t, ctx, `window.__pw.plots.charts.floors.getOption().series.map((s) => s.name)`))
		}
		// The legend's entries sit above the plot the curves are drawn in.
		over := eval[[]string](t, ctx, `(() => { const c = window.__pw.plots.charts.floors; const m = c.getModel();
			const top = m.getComponent('xAxis', 0).axis.grid.getRect().y;
			const o = c.getOption();
			const names = new Set((o.legend[0].data || o.series.map((s) => s.name)).map((d) => (typeof d === 'string' ? d : d.name)));
			const out = [];
			for (const el of c.getZr().storage.getDisplayList(true)) {
				if (!el.style || !names.has(el.style.text)) continue;
				const r = el.getBoundingRect().clone(); r.applyTransform(el.getComputedTransform());
				if (r.y + r.height / 2 + 6 > top) out.push(el.style.text + ' at ' + Math.round(r.y + r.height / 2) + ' px, the plot from ' + Math.round(top));
			}
			return out; })()`)
		for _, o := range over {
			t.Errorf("%s: a Floors legend entry on the plot: %s", d, o)
		}
		shot(t, ctx, d)
	}
}
