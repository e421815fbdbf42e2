package web_test

import (
	"fmt"
	"testing"

	"github.com/chromedp/chromedp"
)

// profileData is JavaScript: the profile series' data the page last
// received (the newest frame's merge or full option) and the chart's.
const (
	sentProfile = `(() => { const c = window.__pw.frame().charts.profile; const e = [c].flat().at(-1);
		return JSON.stringify([e.option.series].flat().find((s) => s.id === 'profile').data); })()`
	chartProfile = `JSON.stringify(window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'profile').data)`
)

// TestSettleWaitsUntilRead: at rest after an edit that leaves the axes
// as they stand, the profile and the echo stay on their fast layers
// (ECharts' setOption, a whole re-layout, is put off), and the page is
// settled; reading a chart, or the pointer over it, gives the chart the
// newest data first. An edit that moves the axes settles the charts as
// before; one that shrinks the y axis by less than half its span waits
// on the taller axis until read. The axis extents the page predicts are checked against
// ECharts' own at every real setOption (__pwAxisMiss).
func TestSettleWaitsUntilRead(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the start scene", fresh+` && window.__pw.frame().report.targets.length >= 2`)
	eval[bool](t, ctx, `(Object.keys(window.__pwWork).forEach((k) => delete window.__pwWork[k]), true)`)
	rcs := eval[float64](t, ctx, `window.__pw.store.scenario.targets[1].rcs_dbsm`)
	// Half a dB on the second target (not the tallest peak): the axes stay.
	eval[bool](t, ctx, `(window.__pw.editor.nudge(1, 0.5), true)`)
	waitFor(t, ctx, "the nudge shown, at rest", fmt.Sprintf(`window.__pw.store.scenario.targets[1].rcs_dbsm === %g && `, rcs+0.5)+fresh)
	if !eval[bool](t, ctx, `window.__pw.plots.behind.has('profile') && window.__pw.plots.fast.active`) {
		t.Errorf("the profile took its data at rest (work: %s); want it behind its fast layer until read", eval[string](t, ctx, `JSON.stringify(Object.keys(window.__pwWork))`))
	}
	if eval[bool](t, ctx, `'settle profile' in window.__pwWork`) {
		t.Error("the profile's setOption ran at rest")
	}
	shot(t, ctx, "behind")
	// Reading the chart brings it up to date.
	if got, want := eval[string](t, ctx, chartProfile), eval[string](t, ctx, sentProfile); got != want {
		t.Errorf("the profile's option after a read holds other data than the frame's (%d against %d bytes)", len(got), len(want))
	}
	if eval[bool](t, ctx, `window.__pw.plots.behind.has('profile') || window.__pw.plots.fast.active`) {
		t.Error("the profile is still behind its fast layer after a read")
	}
	// The pointer over the echo brings the echo up to date.
	if !eval[bool](t, ctx, `window.__pw.plots.behind.has('echo')`) {
		t.Error("the echo took its data at rest")
	}
	ox, oy := chartOrigin(t, ctx, "#chart-echo")
	mouse(t, ctx, chromedp.MouseMoved, ox+150, oy+80)
	if eval[bool](t, ctx, `window.__pw.plots.behind.has('echo') || window.__pw.plots.fasts.echo.active`) {
		t.Error("the echo is still behind its fast layer with the pointer over it")
	}
	mouse(t, ctx, chromedp.MouseMoved, 5, 5)
	// 30 dB on the tallest target: the y axis grows, and the chart settles.
	eval[bool](t, ctx, `(window.__pw.editor.nudge(0, 30), true)`)
	waitFor(t, ctx, "the big nudge shown, at rest", fresh+` && window.__pwLatencies.length > 0 && window.__pw.frame().id === window.__pwLatencies.at(-1).id`)
	if eval[bool](t, ctx, `window.__pw.plots.behind.has('profile') || window.__pw.plots.fast.active`) {
		t.Error("the profile stayed behind its fast layer although its y axis grew")
	}
	if got, want := eval[string](t, ctx, chartProfile), eval[string](t, ctx, sentProfile); got != want {
		t.Error("the profile's option after the big nudge holds other data than the frame's")
	}
	shot(t, ctx, "settled")
	// Back down 30 dB: the y axis would shrink, by less than half its
	// span (the data still fill it). The profile stays on its fast layer
	// on the taller axis until read, and refits then.
	yTop := `window.__pw.plots.charts.profile.getModel().getComponent('yAxis', 0).axis.scale.getExtent()[1]`
	tall := eval[float64](t, ctx, yTop)
	eval[bool](t, ctx, `(window.__pw.editor.nudge(0, -30), true)`)
	waitFor(t, ctx, "the nudge back shown, at rest", fresh+` && window.__pw.frame().id === window.__pwLatencies.at(-1).id`)
	if !eval[bool](t, ctx, `window.__pw.plots.behind.has('profile') && window.__pw.plots.fast.active`) {
		t.Error("the profile re-laid out at rest although its data still fill the y axis")
	}
	if got, want := eval[string](t, ctx, chartProfile), eval[string](t, ctx, sentProfile); got != want {
		t.Error("the profile's option after the nudge back holds other data than the frame's")
	}
	if top := eval[float64](t, ctx, yTop); !(top < tall) {
		t.Errorf("read after the nudge back, the profile's y axis tops at %g dB, as before (%g dB): it did not refit", top, tall)
	}
	if m := eval[string](t, ctx, `JSON.stringify(window.__pwAxisMiss)`); m != "[]" {
		t.Errorf("predicted axis extents that ECharts did not give: %s", m)
	}
	// The page's performance marks of the frames shown are cleared (a
	// long drag left tens of thousands).
	if n := eval[int](t, ctx, `performance.getEntriesByType('mark').length + performance.getEntriesByType('measure').length`); n > 3 {
		t.Errorf("%d performance marks and measures left after the frames were shown, want at most those of one frame in flight", n)
	}
}
