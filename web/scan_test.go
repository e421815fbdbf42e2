package web_test

import (
	"math"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// The scan editor in the Radar tab, driven by real clicks and keys: a
// staring sea scene starts to scan, its sea clutter falls by the Gaussian
// pattern's 1.23 dB (∫f⁴ = 0.7527 θaz; docs/detection.md §14), a pulse
// train under a fast scan gets its hits per scan and scan loss in the
// figures, a bad rate is refused beside its field, and "Stare instead"
// brings the old numbers back.
func TestScanEditor(t *testing.T) {
	ctx := mustBrowserFor(t, 3*time.Minute)
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "sea-clutter-mast")
	stare := eval[float64](t, ctx, jsTarget+`('sea').cell_rcs_dbsm`)
	if eval[bool](t, ctx, `!document.querySelector('.scan-story').hidden`) {
		t.Error("the scan figures show for a staring beam")
	}

	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-tab="radar"]`)))
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-scan [data-act="start"]`)))
	waitFor(t, ctx, "the scan in the report", `!!window.__pw.frame().report.scan`)
	// 1.2° at 36°/s and 200 µs: 166.7 hits per scan.
	if n := eval[float64](t, ctx, `window.__pw.frame().report.scan.hits_per_scan`); math.Abs(n-1.2/36/2e-4) > 1e-9 {
		t.Errorf("hits per scan %g, want 166.7", n)
	}
	scan := eval[float64](t, ctx, jsTarget+`('sea').cell_rcs_dbsm`)
	if d := stare - scan; math.Abs(d-1.2339) > 0.001 {
		t.Errorf("sea cell RCS %.4f → %.4f dBsm: down %.4f, want the Gaussian pattern's 1.2339 dB", stare, scan, d)
	}

	// A pulse train under a fast scan: 16 pulses, 600°/s moves the 1.2°
	// beam 0.1 beamwidth per 200 µs pulse: 10 hits per scan, a 3.2 ms CPI
	// over a 2 ms dwell.
	typeInto(t, ctx, `#ed-radar input[data-path="radar.pulses"]`, "16")
	waitFor(t, ctx, "16 pulses evaluated", `!!window.__pw.frame().report.scan.cpi_loss_db`)
	typeInto(t, ctx, `#ed-scan input[data-scan="radar.scan.rate_deg_s"]`, "600")
	waitFor(t, ctx, "600°/s evaluated", `Math.abs(window.__pw.frame().report.scan.hits_per_scan - 10) < 1e-9`)
	waitFor(t, ctx, "the scan figures", `/10\.0 hits per scan/.test(document.querySelector('.scan-story').textContent)
		&& /longer than the dwell/.test(document.querySelector('.scan-story').textContent)
		&& /trawler [0-9.]+ dB/.test(document.querySelector('.scan-story').textContent)`)
	if txt := eval[string](t, ctx, `document.querySelector('#ed-scan [data-live]').textContent`); !strings.Contains(txt, "10.0 hits per scan") || !strings.Contains(txt, "CPI scan loss") {
		t.Errorf("editor line %q", txt)
	}
	loss := eval[float64](t, ctx, jsTarget+`('trawler').scan_loss_db`)
	if !(loss > 1 && loss < 6) {
		t.Errorf("trawler scan loss %.2f dB, want a few dB for 1.6 beamwidths", loss)
	}
	if !eval[bool](t, ctx, `window.__pw.frame().report.warnings.some((w) => /longer than the 2 ms the beam dwells/.test(w))`) {
		t.Error("no warning of a CPI longer than the dwell")
	}
	// The sinc pattern by keyboard on its menu.
	do(t, ctx, chromedp.Focus(chromedp.CSS(`#ed-scan select[data-scan="radar.scan.pattern"]`)), chromedp.KeyEvent(kb.ArrowDown))
	waitFor(t, ctx, "the sinc pattern evaluated", `window.__pw.frame().report.scan.pattern === 'sinc' && window.__pw.store.scenario.radar.scan.pattern === 'sinc'`)
	shot(t, ctx, "")

	// Text that is not a number stays with its message; the scene keeps 600.
	typeInto(t, ctx, `#ed-scan input[data-scan="radar.scan.rate_deg_s"]`, "6x")
	waitFor(t, ctx, "the local message", `/is not a number/.test(document.querySelector('[data-err-for="radar.scan.rate_deg_s"]').textContent)`)
	if r := eval[float64](t, ctx, `window.__pw.store.scenario.radar.scan.rate_deg_s`); r != 6 {
		t.Errorf("scene rate %g, want the last number typed, 6", r)
	}
	// 0 is refused by the server beside the field; the plots keep 6°/s.
	typeInto(t, ctx, `#ed-scan input[data-scan="radar.scan.rate_deg_s"]`, "0")
	waitFor(t, ctx, "the refusal beside the field", `/must be above 0/.test(document.querySelector('[data-err-for="radar.scan.rate_deg_s"]').textContent)`)
	if n := eval[float64](t, ctx, `window.__pw.frame().report.scan.hits_per_scan`); math.Abs(n-1.2/6/2e-4) > 1e-9 {
		t.Errorf("after a refused rate the plotted hits per scan are %g, want 1000 (6°/s)", n)
	}

	// Stare again: no scan, the sea's old patch.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#ed-scan [data-act="stop"]`)))
	waitFor(t, ctx, "no scan", `!window.__pw.frame().report.scan && !window.__pw.store.scenario.radar.scan && document.querySelector('.scan-story').hidden`)
	typeInto(t, ctx, `#ed-radar input[data-path="radar.pulses"]`, "1")
	waitFor(t, ctx, "one pulse again", `!window.__pw.frame().report.targets.some((t) => t.snr_integrated_db !== undefined)`)
	if got := eval[float64](t, ctx, jsTarget+`('sea').cell_rcs_dbsm`); got != stare {
		t.Errorf("sea cell RCS %.4f after staring again, want %.4f", got, stare)
	}
}
