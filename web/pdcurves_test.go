package web_test

import (
	"fmt"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// The Pd curves tab, opened by a real click on the harbour demo: the
// server's two plots arrive (Pd against SNR, Pd against range in the scene
// and alone), the required Pd is marked, the note beside the target list
// shows the needed SNR and the detection range whole (not cut off in the
// narrow pane), and picking another target in its list with the keyboard
// redraws them for that target. Choosing nautical miles restates the
// range axis, the note and the card's detection range in nmi
// (1 nmi = 1852 m, International Hydrographic Conference, 1929).
func TestPdCurvesTab(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="pdcurves"]`)))
	const drawn = `(() => { const o = window.__pw.plots.charts.pdcurves.getOption(); if (!o || !o.series) return false;
		const s = (id) => o.series.find((x) => x.id === id); return !!s('pd-snr') && s('pd-snr').data.length > 50 && s('pd-range').data.length > 50 && s('pd-alone').data.length > 50; })()`
	waitFor(t, ctx, "the Pd curves", drawn)
	first := eval[string](t, ctx, `document.getElementById('pd-target').value`)
	note := eval[string](t, ctx, `document.getElementById('pd-note').textContent`)
	long := eval[string](t, ctx, `document.getElementById('pd-note').title`)
	if first == "" || !strings.HasPrefix(long, first+":") || !strings.Contains(note, "needed for Pd 0.9") || !strings.Contains(note, "detection range") {
		t.Errorf("target %q, note %q, its tooltip %q", first, note, long)
	}
	if clipped := eval[bool](t, ctx, `(() => { const n = document.getElementById('pd-note'); return n.scrollHeight > n.clientHeight + 1 || n.scrollWidth > n.clientWidth + 1; })()`); clipped {
		t.Errorf("the note %q is cut off in the pane", note)
	}
	if name := eval[string](t, ctx, `window.__pw.plots.charts.pdcurves.getOption().xAxis[1].name`); name != "range (m)" {
		t.Errorf("range axis %q, want range (m)", name)
	}
	marks := eval[[]float64](t, ctx, `window.__pw.plots.charts.pdcurves.getOption().series.find((x) => x.id === 'pd-snr').markLine.data.filter((d) => d.yAxis !== undefined).map((d) => d.yAxis)`)
	if len(marks) != 1 || marks[0] != 0.9 {
		t.Errorf("required Pd marks %v, want [0.9]", marks)
	}
	shot(t, ctx, first)

	// Another target, chosen with the keyboard in the list.
	do(t, ctx, chromedp.Focus(chromedp.CSS(`#pd-target`)), chromedp.KeyEvent("p"))
	waitFor(t, ctx, "the pilot boat chosen", `document.getElementById('pd-target').value === 'pilot-boat'`)
	waitFor(t, ctx, "its curves", `document.getElementById('pd-note').title.startsWith('pilot-boat:')`)
	now := eval[string](t, ctx, `window.__pw.plots.charts.pdcurves.getOption().series.find((x) => x.id === 'pd-range').markLine.data.map((d) => d.label.formatter).join('|')`)
	if !strings.Contains(now, "pilot-boat") {
		t.Errorf("range marks %q", now)
	}
	shot(t, ctx, "pilot-boat")

	// Nautical miles: the axis, the note and the card follow.
	dr := eval[float64](t, ctx, `window.__pw.frame().report.targets.find((x) => x.id === 'pilot-boat').detection_range_m`)
	want := fmt.Sprintf("detection range %.4f nmi", dr/1852)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	pickDown(t, ctx, "range", 2) // m, km, nmi
	waitFor(t, ctx, "the Pd curves in nmi", `window.__pw.plots.charts.pdcurves.getOption().xAxis[1].name === 'range (nmi)'`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures`))) // closes the control
	if note := eval[string](t, ctx, `document.getElementById('pd-note').textContent`); !strings.Contains(note, want) {
		t.Errorf("note in nmi %q, want %q", note, want)
	}
	if txt := eval[string](t, ctx, `document.querySelector('.tcard[data-target="pilot-boat"] .detrange').textContent`); txt != want {
		t.Errorf("card %q, want %q", txt, want)
	}
	shot(t, ctx, "nmi")
}
