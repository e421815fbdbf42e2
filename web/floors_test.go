package web_test

import (
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
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
