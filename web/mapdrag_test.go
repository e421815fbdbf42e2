package web_test

import (
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestMapKeepsScaleWhileDragging: while hill-clutter-doppler's ridge is
// dragged (real mouse events, the path of TestDragRate: ±150 px in 5 px
// steps), the range–Doppler map's colour scale steps by 10 dB and the
// server sends the map whole. ECharts' redraw of its 16 000 cells took
// 50–120 ms each time, long tasks in the middle of the drag; the map's
// fast layer now draws those full options on the colour scale the chart
// shows, and the chart takes the newest when the drag ends.
func TestMapKeepsScaleWhileDragging(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the map drawn", fresh+` && (() => { const o = window.__pw.plots.charts.rdmap.getOption();
		return o.series && o.series.length >= 2 && o.series[0].data.length > 100; })()`)
	count := func(what string) int {
		return eval[int](t, ctx, `window.__pw.plots.`+what+`.rdmap || 0`)
	}
	came0, drawn0 := count("fullsCome"), count("fullDraws")
	p := markerPx(t, ctx, "ridge")
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	x, y := ox+p[0], oy+p[1]
	mouse(t, ctx, chromedp.MouseMoved, x, y)
	mouse(t, ctx, chromedp.MousePressed, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	for i := 0; i < 150; i++ {
		k := i % 120
		dx := float64(k) * 5
		if k >= 60 {
			dx = float64(120-k) * 5
		}
		mouse(t, ctx, chromedp.MouseMoved, x+dx-150*float64(min(i, 1)), y, held)
		time.Sleep(16 * time.Millisecond)
	}
	// Let the last frames of the drag arrive, the button still down.
	waitFor(t, ctx, "the drag's frames", `window.__pw.frame().id >= window.__pw.session.nextId - 1`)
	came1, drawn1 := count("fullsCome"), count("fullDraws")
	if came1 == came0 {
		t.Fatalf("no full option of the map came during the drag: the path no longer steps its colour scale, and this test needs one that does")
	}
	if drawn1 != drawn0 {
		t.Errorf("the map was redrawn whole %d times during the drag (%d full options came); want 0, its fast layer standing in", drawn1-drawn0, came1-came0)
	}
	if !eval[bool](t, ctx, `window.__pw.plots.fasts.rdmap.active`) {
		t.Error("the map's fast layer is not drawing during the drag")
	}
	shot(t, ctx, "dragging")
	mouse(t, ctx, chromedp.MouseReleased, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	// At rest the map may stay behind its fast layer on data merges
	// (canWait); a full option it does not keep waiting.
	waitFor(t, ctx, "the map redrawn after the drag", fresh+` && !(window.__pw.plots.pending.rdmap || []).some((e) => e.replace)`)
	if drawn2 := count("fullDraws"); drawn2 != drawn1+1 {
		t.Errorf("after the drag the map was redrawn whole %d times, want once (its newest full option)", drawn2-drawn1)
	}
	// The chart shows the newest colour scale: the one the last full
	// option carried.
	if !eval[bool](t, ctx, `(() => { const vm = window.__pw.plots.charts.rdmap.getOption().visualMap[0];
		const f = window.__pw.plots.fasts.rdmap.heat; return f && vm.min === f.min && vm.max === f.max; })()`) {
		t.Error("after the drag the map's colour bar and its newest colour scale differ")
	}
	shot(t, ctx, "after")
}
