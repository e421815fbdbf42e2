package web_test

import (
	"fmt"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"github.com/pulsewright/pulsewright/dsp"
	"github.com/pulsewright/pulsewright/scenarios"
)

// JavaScript that reads the Floors chart's settled state: its title and
// the marks' floors by target id ("" until the chart holds them).
const jsFloors = `(() => { const o = window.__pw.plots.charts.floors.getOption(); if (!o || !o.series || !o.title || !o.title.length) return null;
	const marks = {}; for (const s of o.series) if (String(s.id).startsWith('marks-')) for (const d of s.data) marks[d.id] = d.floor + (d.hidden ? ':hidden' : '');
	return { title: o.title[0].text, series: o.series.map((s) => s.id), marks }; })()`

type floorsState struct {
	Title  string
	Series []string
	Marks  map[string]string
}

// The Floors tab on the harbour demo, driven by real clicks: opened, it
// shows the strongest target's (the tanker's) floors, with the skiff
// marked as hidden by the tanker's response (the demo's masking);
// clicking the skiff's row in the target table redraws the view for the
// skiff, where the tanker is not hidden. Hidden again, the tab costs
// nothing: frames come without its chart.
func TestFloorsTab(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	if eval[bool](t, ctx, `'floors' in (window.__pw.frame().charts || {})`) {
		t.Fatal("a frame carries the Floors chart before its tab shows")
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="floors"]`)))
	waitFor(t, ctx, "the tanker's floors", `(() => { const f = `+jsFloors+`; return f && f.title.includes('tanker') && f.marks.skiff === 'response:hidden'; })()`)
	st := eval[floorsState](t, ctx, jsFloors)
	for _, want := range []string{"floor-response", "floor-others", "floor-thermal", "floor-threshold", "marks-response"} {
		if !contains(st.Series, want) {
			t.Errorf("series %v lack %s", st.Series, want)
		}
	}
	if note := eval[string](t, ctx, `document.getElementById('floors-note').textContent`); !strings.Contains(note, "strongest") {
		t.Errorf("note %q", note)
	}
	shot(t, ctx, "tanker")

	// The skiff's row in the target table, clicked.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-targets tr[data-row="1"] td:first-child`)))
	waitFor(t, ctx, "the skiff's floors", `(() => { const f = `+jsFloors+`; return f && f.title.includes('skiff') && f.marks.tanker !== undefined; })()`)
	st = eval[floorsState](t, ctx, jsFloors)
	if strings.HasSuffix(st.Marks["tanker"], ":hidden") {
		t.Errorf("with the skiff selected the tanker is hidden: %v", st.Marks)
	}
	if note := eval[string](t, ctx, `document.getElementById('floors-note').textContent`); !strings.Contains(note, "skiff") {
		t.Errorf("note %q", note)
	}
	shot(t, ctx, "skiff")

	// Another tab: the next frames come without the Floors chart.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="response"]`)))
	waitFor(t, ctx, "the session to stop asking", `window.__pw.session.floors === null`)
	last := eval[float64](t, ctx, `window.__pw.frame().id`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-targets tr[data-row="0"] input[data-level]`)), chromedp.KeyEvent(kb.ArrowUp)) // +1 dB
	waitFor(t, ctx, "a newer frame", `window.__pw.frame().id > `+strconv.FormatFloat(last, 'f', -1, 64)+` && window.__pw.frame().report.targets[0].snr_db !== undefined`)
	if eval[bool](t, ctx, `'floors' in (window.__pw.frame().charts || {})`) {
		t.Error("a frame carries the Floors chart while its tab is hidden")
	}
}

func contains(v []string, s string) bool {
	for _, x := range v {
		if x == s {
			return true
		}
	}
	return false
}

// The case on the page: a 32-pulse train with a tanker 55 dB over
// a skiff in its range gate, 8 Doppler bins away, and a phase-noise
// profile of about −50 dBc over the skiff's Doppler cell (the scene of
// scenarios' TestPhaseNoiseSkirtMasks). The Floors tab, open when the
// scene loads, follows the skiff's map row and marks it hidden by the
// tanker's phase-noise skirt.
func TestFloorsTabPhaseNoise(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="floors"]`)))
	waitFor(t, ctx, "the demo's floors", `(() => { const f = `+jsFloors+`; return f && f.title.includes('tanker'); })()`)
	lambda := scenarios.C / 9.5e9
	rate := -lambda / 2 * 8 / (32 * 1e-4)
	rcs := func(snr, r float64) float64 {
		return snr - dsp.DB(dsp.RadarSNR(1000, 1e-5, dsp.FromDB(30), lambda, 1, r, dsp.FromDB(3), dsp.FromDB(3)))
	}
	scene := fmt.Sprintf(`{"version":2,"name":"phase-noise skirt","radar":{"peak_power_w":1000,"sample_rate_hz":4e7,"pri_s":1e-4,"pulses":32,"window_start_m":3000,"window_stop_m":9000},
		"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7},
		"receiver":{"mti":"none","doppler_window":{"kind":"blackman_harris"},"window":{"kind":"none"},"detector":{"kind":"fixed","pfa":1e-6}},
		"front_end":{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70.5,-70.5,-130]},
		"targets":[{"id":"tanker","kind":"point","range_m":6000,"rcs_dbsm":%g},{"id":"skiff","kind":"point","range_m":6000,"rcs_dbsm":%g,"range_rate_mps":%g}]}`,
		rcs(70, 6000), rcs(15, 6000), rate)
	eval[bool](t, ctx, `(() => { window.__pw.store.load(`+scene+`); return true; })()`)
	waitFor(t, ctx, "the skirt hiding the skiff", `(() => { const f = `+jsFloors+`; return f && f.title.includes('(skiff)') && f.marks.skiff === 'skirt:hidden'; })()`)
	st := eval[floorsState](t, ctx, jsFloors)
	if !contains(st.Series, "floor-skirt") || !contains(st.Series, "marks-skirt") {
		t.Errorf("series %v", st.Series)
	}
	if r := eval[string](t, ctx, jsTarget+`('skiff').reason`); !strings.Contains(r, "tanker's phase-noise skirt") {
		t.Errorf("the skiff's reason does not name the skirt: %s", r)
	}
	shot(t, ctx, "")

	// The tanker's own row, picked with the keyboard in the row list: its
	// zero-Doppler row, where the skiff's mark is off the plotted row.
	do(t, ctx, chromedp.Focus(chromedp.CSS(`#floors-row`)), chromedp.KeyEvent("t"))
	waitFor(t, ctx, "the tanker's row", `(() => { const f = `+jsFloors+`; return f && f.title.includes('+0.0 m/s') && !f.title.includes('(skiff)'); })()`)
	shot(t, ctx, "own-row")
}
