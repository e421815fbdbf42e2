package web_test

import (
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// The hill-clutter demo carries a 3-CPI schedule: the Blind zones tab
// maps it with a marker per point target, the CPI maps tab draws one
// range–Doppler map per CPI, and the schedule editor adds and removes
// CPIs and changes a PRI and M with real clicks and keys, each edit
// re-evaluated by the server.
func TestScheduleTabsAndEditor(t *testing.T) {
	ctx := mustBrowserFor(t, 4*time.Minute)
	openPage(t, ctx, mustServer(t))
	if eval[bool](t, ctx, `!document.querySelector('[data-show="blindzones"]').hidden`) {
		t.Error("the blind-zones tab shows for a scene without a schedule")
	}
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the schedule in the report", `!!window.__pw.frame().report.schedule`)
	waitFor(t, ctx, "the schedule tabs", `!document.querySelector('[data-show="blindzones"]').hidden`)

	// The verdicts under the story: the jet, blind in CPI 1, is detected 2-of-3.
	if txt := eval[string](t, ctx, `document.querySelector('.sched-story').textContent`); !strings.Contains(txt, "jet detected, 2 of 3 CPIs · unfolds to 7.65 km, -157.8 m/s") {
		t.Errorf("schedule verdicts %q", txt)
	}
	// Blind zones: a real click on the tab.
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="blindzones"]`)))
	waitFor(t, ctx, "the blind-zones map drawn", `(() => { const o = window.__pw.plots.charts.blindzones.getOption();
		return o.series && o.series.length === 2 && o.series[0].data.length > 50; })()`)
	type mark struct {
		ID       string     `json:"id"`
		Detected bool       `json:"detected"`
		Value    [2]float64 `json:"value"`
	}
	marks := eval[[]mark](t, ctx, `window.__pw.plots.charts.blindzones.getOption().series.find((s) => s.id === 'markers').data`)
	if len(marks) != 3 {
		t.Fatalf("%d markers, want the 3 point targets: %+v", len(marks), marks)
	}
	for _, m := range marks {
		if m.ID == "jet" && (!m.Detected || m.Value[1] > -150 || m.Value[1] < -165) {
			t.Errorf("jet marker %+v, want detected 2-of-3 at its true −157.8 m/s", m)
		}
	}
	// The jet's true range rate is a blind speed of CPI 1 (100 µs): the
	// map's cell there is seen by fewer than all 3 CPIs.
	pieces := eval[int](t, ctx, `window.__pw.plots.charts.blindzones.getOption().visualMap[0].pieces.length`)
	if pieces != 4 {
		t.Errorf("%d legend pieces, want 0 … 3 of 3", pieces)
	}
	shot(t, ctx, "blindzones")

	// CPI maps: three maps, each with its markers.
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="cpimaps"]`)))
	waitFor(t, ctx, "three CPI maps drawn", `[1, 2, 3].every((k) => { const c = window.__pw.plots.charts['cpimap' + k];
		const o = c && c.getOption(); return o && o.series && o.series[0].data.length > 50 && o.series[1].data.length === 4; })`)
	caption := eval[string](t, ctx, `document.querySelector('[data-cpi="2"] figcaption').textContent`)
	if !strings.Contains(caption, "PRI 125 µs") {
		t.Errorf("CPI 2 caption %q", caption)
	}
	shot(t, ctx, "cpimaps")

	// The schedule editor in the Radar tab.
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-tab="radar"]`)))
	if n := eval[int](t, ctx, `document.querySelectorAll('#ed-schedule .sched-row').length`); n != 3 {
		t.Fatalf("%d schedule rows, want 3", n)
	}
	// Remove CPI 3: a 2-CPI schedule with m still 2.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-schedule [data-act="remove"][data-i="1"]`)))
	waitFor(t, ctx, "two CPIs evaluated", `(() => { const s = window.__pw.frame().report.schedule; return s && s.n === 2 && s.m === 2; })()`)
	// The jet is now seen by CPI 2 alone: 2-of-2 misses it.
	if eval[bool](t, ctx, `window.__pw.frame().report.schedule.targets.find((t) => t.id === 'jet').detected`) {
		t.Error("2-of-2 with the jet blind in CPI 1 still detects it")
	}
	// M = 1: detected again.
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.m"]`, "1")
	waitFor(t, ctx, "1-of-2 detects the jet", `(() => { const s = window.__pw.frame().report.schedule;
		return s.m === 1 && s.targets.find((t) => t.id === 'jet').detected; })()`)
	// Text that is not a number stays in its field with its message, the
	// scene keeps the last number typed (12 µs: keys arrive one by one),
	// and the message outlives the frame of another edit.
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.cpis[0].pri_s"]`, "12x")
	waitFor(t, ctx, "the local message", `/is not a number/.test(document.querySelector('[data-err-for="radar.schedule.cpis[0].pri_s"]').textContent)`)
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.m"]`, "2")
	waitFor(t, ctx, "m = 2 evaluated", `window.__pw.frame().report.schedule.m === 2`)
	if !eval[bool](t, ctx, `/is not a number/.test(document.querySelector('[data-err-for="radar.schedule.cpis[0].pri_s"]').textContent)
		&& window.__pw.store.scenario.radar.schedule.cpis[0].pri_s === 1.2e-5`) {
		t.Error("the message of text that is not a number went with another edit's frame, or the scene took the bad text")
	}
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.m"]`, "1")
	waitFor(t, ctx, "m = 1 again", `window.__pw.frame().report.schedule.m === 1`)
	// A PRI below the 10 µs pulse is refused beside its field; the plots
	// keep the last accepted one (12 µs).
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.cpis[0].pri_s"]`, "5")
	waitFor(t, ctx, "the refusal beside the field", `/must be above/.test(document.querySelector('[data-err-for="radar.schedule.cpis[0].pri_s"]').textContent)`)
	if got := eval[float64](t, ctx, `window.__pw.frame().report.schedule.cpis[1].pri_s`); got != 1.2e-5 {
		t.Errorf("after a refused PRI the plotted CPI 2 has PRI %g, want the last accepted 12 µs", got)
	}
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.cpis[0].pri_s"]`, "140")
	waitFor(t, ctx, "the new PRI evaluated", `window.__pw.frame().report.schedule.cpis[1].pri_s === 1.4e-4`)
	// Add a CPI (10 % above the last: 154 µs), then remove both extras:
	// no schedule left, and the tabs go.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-schedule [data-act="add"]`)))
	waitFor(t, ctx, "three CPIs again", `window.__pw.frame().report.schedule.n === 3 && window.__pw.frame().report.schedule.cpis[2].pri_s === 1.54e-4`)
	shot(t, ctx, "editor")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-schedule [data-act="remove"][data-i="1"]`)))
	waitFor(t, ctx, "two CPIs", `window.__pw.frame().report.schedule.n === 2`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-schedule [data-act="remove"][data-i="0"]`)))
	waitFor(t, ctx, "no schedule", `!window.__pw.frame().report.schedule && !window.__pw.store.scenario.radar.schedule`)
	if !eval[bool](t, ctx, `document.querySelector('[data-show="blindzones"]').hidden && document.querySelector('[data-show="cpimaps"]').hidden`) {
		t.Error("the schedule tabs stay without a schedule")
	}
	if eval[bool](t, ctx, `document.querySelector('#panel-left [data-pane="cpimaps"]').classList.contains('on')`) {
		t.Error("the CPI maps pane stays shown without a schedule")
	}
	// Start one again from the button.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-schedule [data-act="start"]`)))
	waitFor(t, ctx, "a schedule started", `(() => { const s = window.__pw.frame().report.schedule; return s && s.n === 2; })()`)
}

// The long-pulse demo's ghost at 60.10 km is unfolded by its second CPI:
// the verdicts name the true 210 km.
func TestScheduleUnfoldsGhostOnPage(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "long-pulse-blind")
	waitFor(t, ctx, "the verdicts", `/airliner-far detected, 2 of 2 CPIs · unfolds to 210.00 km/.test(document.querySelector('.sched-story').textContent)`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="blindzones"]`)))
	waitFor(t, ctx, "the blind-zones map drawn", `(() => { const o = window.__pw.plots.charts.blindzones.getOption();
		return o.series && o.series[1].data.length === 4; })()`)
	// Single-pulse CPIs have no map: the CPI maps pane says so.
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="cpimaps"]`)))
	waitFor(t, ctx, "the no-map hint", `/no range–Doppler map/.test(document.querySelector('#cpimaps').textContent)`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-show="blindzones"]`)))
	shot(t, ctx, "")
}
