package web_test

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// jsLoad loads a scenario built by a JS promise expression into the page.
func jsLoad(t *testing.T, ctx context.Context, scenario string) {
	t.Helper()
	eval[bool](t, ctx, `(async () => { window.__pw.store.load(await `+scenario+`); return true; })()`)
	waitFor(t, ctx, "the loaded scene", fresh+` && window.__pw.frame().report.scenario === window.__pw.store.scenario.name`)
}

// js64k is a 64 k-sample scene: a 20 MHz receive window of 65 536 samples.
const js64k = `fetch('/api/v1/demos/harbour-skiff').then((r) => r.json()).then((s) => {
	s.radar.sample_rate_hz = 20e6; s.radar.pri_s = 4e-3; s.radar.window_start_m = 3500;
	s.radar.window_stop_m = 3500 + 65535 * 299792458 / 2 / 20e6; return s; })`

func TestPageOpensOnStartDemo(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	start := eval[string](t, ctx, `fetch('/api/v1/demos').then((r) => r.json()).then(async (ds) => {
		const d = ds.find((x) => x.start); return d ? (await (await fetch('/api/v1/demos/' + d.name)).json()).name : ''; })`)
	if start == "" {
		t.Fatal("no demo is marked start")
	}
	waitFor(t, ctx, "the start demo's frame", fmt.Sprintf(`window.__pw.frame().report.scenario === %q`, start))
	if got := eval[string](t, ctx, `document.querySelector('#ed-scene input').value`); got != start {
		t.Errorf("editor shows scene %q, want %q", got, start)
	}
	shot(t, ctx, "")
}

func TestZoomSendsViewAndGetsFullResolution(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	jsLoad(t, ctx, js64k)
	const step = 299792458 / 2 / 20e6 // m per sample
	const jsPts = `((lo, hi) => { const d = window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'profile').data;
		return d.filter((p) => p[0] >= lo && p[0] <= hi).map((p) => p[0]); })`
	whole := eval[[]float64](t, ctx, jsPts+`(0, 1e9)`)
	if len(whole) > 4*2000 || len(whole) < 200 {
		t.Fatalf("whole window: %d points for 65 536 samples; the server should decimate to the plot's width", len(whole))
	}
	lo, hi := 9000.0, 9000+300*step
	// Zoom, and zoom again on each poll until the session holds the view: a
	// full option that lands meanwhile (a slow machine, -race) resets the zoom.
	zoom := fmt.Sprintf(`window.__pw.plots.charts.profile.dispatchAction({type: 'dataZoom', dataZoomIndex: 0, startValue: %g, endValue: %g})`, lo, hi)
	do(t, ctx, chromedp.Evaluate[chromedp.Void](zoom))
	waitFor(t, ctx, "the view message", fmt.Sprintf(`(() => { const r = window.__pw.session.view.range;
		if (r && Math.abs(r[0] - %g) < 1 && Math.abs(r[1] - %g) < 1) return true; %s; return false; })()`, lo, hi, zoom))
	waitFor(t, ctx, "full resolution inside the zoom", jsPts+fmt.Sprintf(`(%g, %g).length > 250`, lo, hi))
	in := eval[[]float64](t, ctx, jsPts+fmt.Sprintf(`(%g, %g)`, lo, hi))
	for i := 1; i < len(in); i++ {
		if d := in[i] - in[i-1]; math.Abs(d-step) > 0.02 {
			t.Fatalf("points %d and %d inside the zoom are %.3f m apart, want every sample (%.3f m)", i-1, i, d, step)
		}
	}
	shot(t, ctx, "zoomed")
	// Back out: the decimated outline again.
	const unzoom = `window.__pw.plots.charts.profile.dispatchAction({type: 'dataZoom', dataZoomIndex: 0, start: 0, end: 100})`
	do(t, ctx, chromedp.Evaluate[chromedp.Void](unzoom))
	waitFor(t, ctx, "the whole window", `(() => { if (window.__pw.session.view.range === null) return true; `+unzoom+`; return false; })()`)
	waitFor(t, ctx, "decimated again", jsPts+fmt.Sprintf(`(%g, %g).length < 50`, lo, hi))
}

func TestPinCompare(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the skiff masked", jsTarget+`('skiff').status === 'masked'`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-pin`)))
	waitFor(t, ctx, "the reference", `!!window.__pw.frame().reference`)
	do(t, ctx,
		chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)),
		chromedp.Evaluate[chromedp.Void](`(() => { const s = document.querySelector('select[data-action="window-kind:receiver.window"]');
			s.value = 'taylor'; s.dispatchEvent(new Event('change', {bubbles: true})); })()`))
	waitFor(t, ctx, "the Taylor frame with its reference", fresh+` && `+jsTarget+`('skiff').status === 'detected' && window.__pw.frame().reference`)
	ref := eval[int](t, ctx, `(window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'reference') || {data: []}).data.length`)
	if ref < 100 {
		t.Errorf("pinned profile has %d points", ref)
	}
	heads := eval[string](t, ctx, `[...document.querySelectorAll('#figures table.figs thead th')].map((e) => e.textContent).join('|')`)
	if heads != "Figure|Now|Pinned" {
		t.Errorf("figures columns %q, want Figure|Now|Pinned", heads)
	}
	// Side by side: PSLR of the Taylor window now, of the rectangular pinned.
	pslr := eval[[]string](t, ctx, `[...document.querySelectorAll('#figures table.figs tbody tr')].find((r) => r.firstChild.textContent === 'PSLR').querySelectorAll('td').length ? [...[...document.querySelectorAll('#figures table.figs tbody tr')].find((r) => r.firstChild.textContent === 'PSLR').querySelectorAll('td')].map((e) => e.textContent) : []`)
	if len(pslr) != 2 || pslr[0] == pslr[1] {
		t.Errorf("PSLR now and pinned: %v", pslr)
	}
	if got := eval[string](t, ctx, `document.querySelector('.tcard[data-target="skiff"] .was').textContent`); !strings.Contains(got, "masked") {
		t.Errorf("skiff's card says %q about the pinned status", got)
	}
	shot(t, ctx, "pinned")

	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-pin`)))
	waitFor(t, ctx, "the reference gone", fresh+` && !window.__pw.frame().reference && !window.__pw.plots.charts.profile.getOption().series.some((s) => s.id === 'reference')`)
	if n := eval[int](t, ctx, `document.querySelectorAll('#figures table.figs thead th').length`); n != 2 {
		t.Errorf("figures table has %d columns after unpinning, want 2", n)
	}
	shot(t, ctx, "unpinned")
}

// captureDownloads makes the page keep each Blob it offers for download
// and each downloaded data URL, instead of saving files.
const captureDownloads = `(() => { window.__dl = [];
	const make = URL.createObjectURL; const blobs = new Map();
	URL.createObjectURL = (b) => { const u = make(b); blobs.set(u, b); return u; };
	HTMLAnchorElement.prototype.click = function () { window.__dl.push({name: this.download, href: this.href, blob: blobs.get(this.href) || null}); };
	return true; })()`

func TestExportAndImport(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	eval[bool](t, ctx, captureDownloads)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-export`)))
	waitFor(t, ctx, "the JSON download", `window.__dl.length === 1`)
	name := eval[string](t, ctx, `window.__dl[0].name`)
	text := eval[string](t, ctx, `window.__dl[0].blob.text()`)
	var exported, current map[string]any
	if err := json.Unmarshal([]byte(text), &exported); err != nil {
		t.Fatalf("exported %s is not JSON: %v", name, err)
	}
	json.Unmarshal([]byte(eval[string](t, ctx, `JSON.stringify(window.__pw.store.scenario)`)), &current)
	if !strings.HasSuffix(name, ".json") || fmt.Sprint(exported) != fmt.Sprint(current) {
		t.Errorf("exported %s differs from the scene", name)
	}

	waitFor(t, ctx, "the engine stamp", `document.querySelector('#engine').textContent !== ''`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-csv`)))
	waitFor(t, ctx, "the CSV download", `window.__dl.length === 2`)
	csv := strings.Split(strings.TrimSpace(eval[string](t, ctx, `window.__dl[1].blob.text()`)), "\n")
	// The engine's comment line first, as in every CSV the program writes.
	if eng := eval[string](t, ctx, `document.querySelector('#engine').textContent`); csv[0] != "# "+eng || !strings.HasPrefix(eng, "pulsewright ") {
		t.Errorf("CSV first line %q, want the engine's comment line \"# %s\"", csv[0], eng)
	}
	csv = csv[1:]
	if csv[0] != "range_m,profile_db,clean_db,threshold_db,noise_db" || len(csv) < 500 {
		t.Errorf("CSV head %q, %d lines", csv[0], len(csv))
	}
	var r, p float64
	if _, err := fmt.Sscanf(strings.SplitN(csv[len(csv)/2], ",", 3)[0]+" "+strings.SplitN(csv[len(csv)/2], ",", 3)[1], "%g %g", &r, &p); err != nil || r < 3000 || r > 9000 {
		t.Errorf("CSV row %q: range %g, profile %g (%v)", csv[len(csv)/2], r, p, err)
	}

	do(t, ctx, chromedp.Click(chromedp.CSS(`[data-png="profile"]`)))
	waitFor(t, ctx, "the PNG download", `window.__dl.length === 3`)
	if png := eval[string](t, ctx, `window.__dl[2].href.slice(0, 22)`); png != "data:image/png;base64," {
		t.Errorf("PNG download %q", png)
	}

	// Import a changed copy of the exported file.
	exported["name"] = "Imported harbour"
	exported["targets"].([]any)[1].(map[string]any)["range_m"] = 7777.0
	b, _ := json.Marshal(exported)
	file := filepath.Join(t.TempDir(), "imported.json")
	if err := os.WriteFile(file, b, 0o644); err != nil {
		t.Fatal(err)
	}
	do(t, ctx, chromedp.SetUploadFiles(chromedp.CSS(`#file-import`), []string{file}))
	waitFor(t, ctx, "the imported scene", fresh+` && window.__pw.frame().report.scenario === 'Imported harbour' && `+jsTarget+`('skiff').range_m === 7777`)
	shot(t, ctx, "imported")
}

func TestLibrarySaveOpenConflictDelete(t *testing.T) {
	ctx := mustBrowser(t)
	base := mustServer(t)
	openPage(t, ctx, base)
	save := func(ctx context.Context, name string) {
		t.Helper()
		do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-library`)))
		waitFor(t, ctx, "the library", `document.querySelector('#library').open`)
		do(t, ctx, chromedp.SetValue(chromedp.CSS(`#lib-name`), name), chromedp.Click(chromedp.CSS(`#lib-save`)))
	}
	rowNames := `[...document.querySelectorAll('#lib-rows tr td:first-child')].map((e) => e.textContent).join(',')`
	save(ctx, "harbour-a")
	waitFor(t, ctx, "the saved row", rowNames+` === 'harbour-a'`)
	shot(t, ctx, "saved")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#library .lib-foot button`)))

	// A second tab opens it, changes it and saves it back (its If-Match
	// is the revision it opened).
	ctx2 := newTab(t, ctx)
	openPage(t, ctx2, base)
	do(t, ctx2, chromedp.Click(chromedp.CSS(`#btn-library`)))
	waitFor(t, ctx2, "the list", rowNames+` === 'harbour-a'`)
	do(t, ctx2, chromedp.Click(chromedp.CSS(`#lib-rows tr td.acts button`))) // Open
	waitFor(t, ctx2, "the opened scene", `!document.querySelector('#library').open && document.querySelector('#notice-text').textContent.includes('Opened')`)
	typeInto(t, ctx2, `tr[data-row="2"] input[data-path="targets[2].rcs_dbsm"]`, "21")
	waitFor(t, ctx2, "the edit", `window.__pw.store.scenario.targets[2].rcs_dbsm === 21`)
	save(ctx2, "harbour-a")
	waitFor(t, ctx2, "saved over", `document.querySelector('#notice-text').textContent.includes('Saved as')`)

	// The first tab saves its older revision: a conflict, and it loads theirs.
	typeInto(t, ctx, `tr[data-row="0"] input[data-path="targets[0].rcs_dbsm"]`, "30")
	waitFor(t, ctx, "the edit", `window.__pw.store.scenario.targets[0].rcs_dbsm === 30`)
	save(ctx, "harbour-a")
	waitFor(t, ctx, "the conflict", `!document.querySelector('#lib-conflict').hidden`)
	shot(t, ctx, "conflict")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-reload`)))
	waitFor(t, ctx, "their version", `window.__pw.store.scenario.targets[2].rcs_dbsm === 21 && window.__pw.store.scenario.targets[0].rcs_dbsm === 32`)

	// Delete it.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-library`)))
	waitFor(t, ctx, "the list", rowNames+` === 'harbour-a'`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-rows tr td.acts button[data-lib="delete"]`)))
	waitFor(t, ctx, "the confirmation", `!!document.querySelector('#lib-rows [data-lib="confirm-delete"]')`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-rows [data-lib="confirm-delete"]`)))
	waitFor(t, ctx, "the empty list", `document.querySelector('#lib-rows').textContent.includes('Nothing saved yet')`)
	if n := eval[int](t, ctx, `fetch('/api/v1/scenarios').then((r) => r.json()).then((l) => (Array.isArray(l) ? l : l.scenarios || []).length)`); n != 0 {
		t.Errorf("%d saved scenarios left after delete", n)
	}
	shot(t, ctx, "deleted")
}
