package web_test

import (
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// The Pd curves tab, opened by a real click on the harbour demo: the
// server's two plots arrive (Pd against SNR, Pd against range in the scene
// and alone), the required Pd is marked, and picking another target in
// its list with the keyboard redraws them for that target.
func TestPdCurvesTab(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="pdcurves"]`)))
	const drawn = `(() => { const o = window.__pw.plots.charts.pdcurves.getOption(); if (!o || !o.series) return false;
		const s = (id) => o.series.find((x) => x.id === id); return !!s('pd-snr') && s('pd-snr').data.length > 50 && s('pd-range').data.length > 50 && s('pd-alone').data.length > 50; })()`
	waitFor(t, ctx, "the Pd curves", drawn)
	first := eval[string](t, ctx, `document.getElementById('pd-target').value`)
	note := eval[string](t, ctx, `document.getElementById('pd-note').textContent`)
	if first == "" || !strings.Contains(note, first+":") || !strings.Contains(note, "detection range") {
		t.Errorf("target %q, note %q", first, note)
	}
	marks := eval[[]float64](t, ctx, `window.__pw.plots.charts.pdcurves.getOption().series.find((x) => x.id === 'pd-snr').markLine.data.filter((d) => d.yAxis !== undefined).map((d) => d.yAxis)`)
	if len(marks) != 1 || marks[0] != 0.9 {
		t.Errorf("required Pd marks %v, want [0.9]", marks)
	}
	shot(t, ctx, first)

	// Another target, chosen with the keyboard in the list.
	do(t, ctx, chromedp.Focus(chromedp.CSS(`#pd-target`)), chromedp.KeyEvent("p"))
	waitFor(t, ctx, "the pilot boat chosen", `document.getElementById('pd-target').value === 'pilot-boat'`)
	waitFor(t, ctx, "its curves", `document.getElementById('pd-note').textContent.startsWith('pilot-boat:')`)
	now := eval[string](t, ctx, `window.__pw.plots.charts.pdcurves.getOption().series.find((x) => x.id === 'pd-range').markLine.data.map((d) => d.label.formatter).join('|')`)
	if !strings.Contains(now, "pilot-boat") {
		t.Errorf("range marks %q", now)
	}
	shot(t, ctx, "pilot-boat")
}
