package web_test

import (
	"fmt"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestDragRate drags a marker on the profile of every demo with real mouse
// events, one move per 16 ms for 2.5 s, and logs how many new pictures
// the page painted per second (the page's own performance marks: one
// entry in __pwLatencies per frame painted for an edit it sent) and the
// send→paint latency of those. It measures; the goal (≥ 20 updates/s,
// p95 ≤ 50 ms) is recorded in bench/RESULTS.md, not asserted: the
// machine is shared.
func TestDragRate(t *testing.T) {
	if testing.Short() {
		t.Skip("drag measurement skipped in -short")
	}
	ctx := mustBrowserFor(t, 8*time.Minute)
	openPage(t, ctx, mustServer(t))
	demos := eval[[]string](t, ctx, `fetch('/api/v1/demos').then((r) => r.json()).then((d) => d.map((x) => x.name))`)
	for _, d := range demos {
		eval[bool](t, ctx, fmt.Sprintf(`(async () => { const s = await fetch('/api/v1/demos/%s').then((r) => r.json()); window.__pw.store.load(s); return true; })()`, d))
		waitFor(t, ctx, d+" loaded", fresh+` && window.__pw.frame().report.scenario === window.__pw.store.scenario.name`)
		// The first target whose marker lies inside the plot, away from its edges.
		id := eval[string](t, ctx, `(() => { const c = window.__pw.plots.charts.profile; const w = c.getWidth();
			const o = c.getOption().series.find((s) => s.id === 'markers');
			const m = o.data.find((d) => { const p = c.convertToPixel({seriesId: 'markers'}, d.value); return p[0] > 180 && p[0] < w - 180; });
			return m ? m.id : ''; })()`)
		if id == "" {
			t.Logf("%-22s no marker to drag", d)
			continue
		}
		p := markerPx(t, ctx, id)
		ox, oy := chartOrigin(t, ctx, "#chart-profile")
		x, y := ox+p[0], oy+p[1]
		eval[bool](t, ctx, `(window.__pwLatencies.length = 0, window.__pwLongTasks.length = 0, window.__pwLoAF.length = 0, Object.keys(window.__pwWork).forEach((k) => delete window.__pwWork[k]), true)`)
		load0, cpu0 := loadAvg(), cpuNow(t, ctx)
		mouse(t, ctx, chromedp.MouseMoved, x, y)
		mouse(t, ctx, chromedp.MousePressed, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
		t0 := eval[float64](t, ctx, `performance.now()`)
		start := time.Now()
		moves := 0
		for i := 0; time.Since(start) < 2500*time.Millisecond; i++ {
			// Back and forth over ±150 px, 5 px a step.
			k := i % 120
			dx := float64(k) * 5
			if k >= 60 {
				dx = float64(120-k) * 5
			}
			mouse(t, ctx, chromedp.MouseMoved, x+dx-150*float64(min(i, 1)), y, held)
			moves++
			time.Sleep(16 * time.Millisecond)
		}
		t1 := eval[float64](t, ctx, `performance.now()`)
		// While the button is still down the profile's data is drawn by
		// the page's fast layer (fastlayer.js), not by the chart.
		if eval[bool](t, ctx, `window.__pw.plots.fast.active`) {
			shot(t, ctx, d+"-dragging")
		}
		mouse(t, ctx, chromedp.MouseReleased, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
		cpu1, load1 := cpuNow(t, ctx), loadAvg()
		lat := eval[[]latency](t, ctx, `window.__pwLatencies.slice()`)
		long := eval[[]float64](t, ctx, `window.__pwLongTasks.slice()`)
		secs := (t1 - t0) / 1000
		if len(lat) == 0 {
			t.Errorf("%s: no picture painted while dragging %s", d, id)
			continue
		}
		st := stats(lat)
		t.Logf("%-22s drag %-14s %3d moves, %3d pictures in %.1f s: %5.1f updates/s | edit→pixels median %4.0f ms, p95 %4.0f | send→pixels median %4.0f, p95 %4.0f | load %s→%s",
			d, id, moves, len(lat), secs, float64(len(lat))/secs, median(st.edit), quantile(st.edit, 0.95), median(st.ms), quantile(st.ms, 0.95), load0, load1)
		t.Logf("%-22s stages (medians): server compute %.1f ms | send→arrival %.1f | parse %.1f | profile setOption %.1f | marks %.1f | after the paint %.1f | long tasks %d, max %.0f ms | %d held back | %s",
			"", median(st.compute), median(st.wait), median(st.parse), median(st.charts), median(st.panel), median(st.rest), len(long), maxOr0(long), st.held, cpu1.perPicture(cpu0, len(lat)))
		logPageWork(t, ctx, d, lat)
		shot(t, ctx, d)
		waitFor(t, ctx, "the drag's last frame", fresh)
	}
}
