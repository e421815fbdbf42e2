package web_test

import (
	"math"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// The hill-clutter demo's first CPI (100 µs) is blind to the jet at
// −157.8 m/s. Typing a 100/125 µs stagger into CPI 1's stagger field
// (real keys) makes that CPI a staggered train: the report names the
// stagger with its first blind speed λ/(2Δ) = 631.1 m/s (Skolnik,
// Introduction to Radar Systems, 3rd ed., ch. 3, staggered PRFs), CPI 1
// now detects the jet, and the velocity response chart under the editor
// draws its curve with the blind speed marked. Text that is not a stagger
// stays on its field and leaves the scene as it was; clearing the field
// removes the stagger and the chart.
func TestStaggerEditorAndVelocityChart(t *testing.T) {
	ctx := mustBrowserFor(t, 4*time.Minute)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the schedule in the report", `!!window.__pw.frame().report.schedule`)
	if eval[bool](t, ctx, `window.__pw.frame().report.schedule.cpis[0].targets.find((t) => t.id === 'jet').detected`) {
		t.Fatal("CPI 1 (100 µs) detects the jet at its blind speed before any stagger")
	}
	// The classic staggered MTI: a two-pulse canceller ahead of the
	// filter bank (set as the Receive tab would; the stagger is typed).
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`window.__pw.store.update((s) => { s.receiver = s.receiver || {}; s.receiver.mti = 'two_pulse'; }, 'test:mti'); window.__pw.store.seal()`))
	waitFor(t, ctx, "the canceller evaluated", `window.__pw.frame().report.waveform.doppler_resolution_hz !== undefined && window.__pw.store.scenario.receiver.mti === 'two_pulse'`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-tab="radar"]`)))
	if !eval[bool](t, ctx, `document.getElementById('ed-velocity').hidden`) {
		t.Error("the velocity response shows without a stagger")
	}
	sel := `#ed-schedule [data-sched="radar.pri_stagger_s"]`
	typeInto(t, ctx, sel, "100, 125")
	waitFor(t, ctx, "the stagger evaluated", `(() => { const st = window.__pw.frame().report.stagger;
		return st && st.pri_s.length === 2 && st.pri_s[1] === 1.25e-4; })()`)
	st := eval[map[string]float64](t, ctx, `(() => { const s = window.__pw.frame().report.stagger;
		return {blind: s.first_blind_speed_mps, step: s.step_s, mean: s.mean_pri_blind_speed_mps, dip: s.deepest_dip_db}; })()`)
	if math.Abs(st["blind"]-631.142) > 0.01 || st["step"] != 25e-6 || math.Abs(st["blind"]/st["mean"]-4.5) > 1e-9 {
		t.Errorf("stagger report %v; want 631.14 m/s, Δ 25 µs, 4.5 × the mean PRI's", st)
	}
	if !eval[bool](t, ctx, `window.__pw.store.scenario.radar.pri_s === 1e-4`) {
		t.Error("pri_s is not the stagger's shortest PRI")
	}
	waitFor(t, ctx, "CPI 1 detects the jet", `window.__pw.frame().report.schedule.cpis[0].targets.find((t) => t.id === 'jet').detected`)
	// The chart: one curve over 0 … 1.25 × 631.1 m/s with the blind speed
	// marked, and the line above it naming the figures.
	waitFor(t, ctx, "the velocity response drawn", `(() => { const o = window.__pw.plots.charts.velocity.getOption();
		return !document.getElementById('ed-velocity').hidden && o.series && o.series.length === 1 && o.series[0].data.length === 361; })()`)
	curve := eval[[][2]float64](t, ctx, `window.__pw.plots.charts.velocity.getOption().series[0].data`)
	last := curve[len(curve)-1][0]
	if math.Abs(last-1.25*631.142) > 0.01 {
		t.Errorf("curve ends at %.2f m/s, want 1.25 × 631.14", last)
	}
	at := func(v float64) float64 { return curve[int(math.Round(v/last*float64(len(curve)-1)))][1] }
	if at(631.142) > -30 || at(157.8) < -10 {
		t.Errorf("response %.1f dB at the stagger's blind speed, %.1f dB at the 100 µs PRI's: want a deep notch and a passband", at(631.142), at(157.8))
	}
	mark := eval[float64](t, ctx, `window.__pw.plots.charts.velocity.getOption().series[0].markLine.data[0].xAxis`)
	if math.Abs(mark-631.142) > 0.01 {
		t.Errorf("blind speed marked at %.3f m/s", mark)
	}
	sum := eval[string](t, ctx, `document.getElementById('vel-sum').textContent`)
	if !strings.Contains(sum, "100 / 125 µs, first blind speed 631.1 m/s (4.50 × the mean PRI’s 140.3 m/s)") {
		t.Errorf("summary %q", sum)
	}
	if !strings.Contains(eval[string](t, ctx, `document.querySelector('#ed-schedule [data-own]').textContent`), "stagger 100, 125 µs") {
		t.Error("CPI 1's row does not name its stagger")
	}
	do(t, ctx, chromedp.ScrollIntoView(chromedp.CSS(`#ed-velocity`)))
	shot(t, ctx, "velocity")

	// CPI 2's stagger field: its report names the stagger and λ/(2Δ).
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.cpis[0].pri_stagger_s"]`, "125 150")
	waitFor(t, ctx, "CPI 2 staggered", `(() => { const c = window.__pw.frame().report.schedule.cpis[1];
		return c.pri_stagger_s && c.pri_stagger_s.length === 2 && Math.abs(c.blind_speed_mps - 631.142) < 0.01; })()`)
	waitFor(t, ctx, "two curves", `window.__pw.plots.charts.velocity.getOption().series.length === 2`)
	if !eval[bool](t, ctx, `document.querySelector('#ed-schedule [data-sched="radar.schedule.cpis[0].pri_s"]').disabled`) {
		t.Error("CPI 2's PRI field stays editable under a stagger")
	}
	// One PRI is not a stagger: the message stays on the field, the scene
	// keeps CPI 1's stagger.
	typeInto(t, ctx, sel, "100")
	waitFor(t, ctx, "the local message", `/1 PRIs; give 2 … 16/.test(document.querySelector('[data-err-for="radar.pri_stagger_s"]').textContent)`)
	if !eval[bool](t, ctx, `window.__pw.store.scenario.radar.pri_stagger_s.length === 2`) {
		t.Error("the scene took a one-PRI stagger")
	}
	// A PRI below the pulse is refused by the server beside the field.
	typeInto(t, ctx, sel, "100, 1")
	waitFor(t, ctx, "the refusal", `/must be above/.test(document.querySelector('#ed-schedule').textContent)`)
	if got := eval[int](t, ctx, `window.__pw.frame().report.stagger.pri_s.length`); got != 2 || !eval[bool](t, ctx, `window.__pw.frame().report.stagger.pri_s[1] === 1.25e-4`) {
		t.Error("the plots left the last accepted stagger")
	}
	shot(t, ctx, "refused")
	// Clearing both fields: no stagger, no chart.
	do(t, ctx, chromedp.Focus(chromedp.CSS(sel)), chromedp.Evaluate[chromedp.Void](`document.querySelector('`+sel+`').select()`), chromedp.KeyEvent("\b"))
	typeInto(t, ctx, `#ed-schedule [data-sched="radar.schedule.cpis[0].pri_stagger_s"]`, "")
	do(t, ctx, chromedp.KeyEvent("\b"))
	waitFor(t, ctx, "no stagger", `!window.__pw.frame().report.stagger && !window.__pw.frame().report.schedule.cpis[1].pri_stagger_s`)
	waitFor(t, ctx, "the chart gone", `document.getElementById('ed-velocity').hidden`)
}
