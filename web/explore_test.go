package web_test

import (
	"fmt"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestExplore… walk through the page as a customer-eyes audit does and
// check nothing: screenshots at every step under test-output, for a
// person to look at, and logs of what each click did. Skipped unless
// PW_EXPLORE=1 (PW_DEMOS=a,b limits TestExplore to those demos).
func TestExplore(t *testing.T) {
	if os.Getenv("PW_EXPLORE") == "" {
		t.Skip("set PW_EXPLORE=1")
	}
	ctx := mustBrowserFor(t, 15*time.Minute)
	base := mustServer(t)
	openPage(t, ctx, base)
	demos := eval[[]string](t, ctx, `fetch('/api/v1/demos').then((r) => r.json()).then((d) => d.map((x) => x.name))`)
	if f := os.Getenv("PW_DEMOS"); f != "" {
		demos = strings.Split(f, ",")
	}
	sizes := [][2]int64{{1280, 720}, {1600, 1000}}
	for _, size := range sizes {
		do(t, ctx, chromedp.EmulateViewport(size[0], size[1]))
		for _, d := range demos {
			tag := fmt.Sprintf("%d-%s", size[0], d)
			loadDemo(t, ctx, d)
			waitFor(t, ctx, "settled", fresh)
			shot(t, ctx, tag+"-00loaded")
			if size[0] == 1600 {
				continue
			}
			// Every plot tab, left and right.
			tabs := eval[[]string](t, ctx, `[...document.querySelectorAll('.plot-head [data-show]')].filter((b) => !b.hidden).map((b) => b.dataset.show)`)
			for i, tab := range tabs {
				do(t, ctx, chromedp.Click(chromedp.CSS(fmt.Sprintf(`.plot-head [data-show=%q]`, tab))))
				time.Sleep(900 * time.Millisecond)
				shot(t, ctx, fmt.Sprintf("%s-01tab%02d-%s", tag, i, tab))
			}
			// Back to the first tabs.
			do(t, ctx, chromedp.Click(chromedp.CSS(`#panel-left .plot-head [data-show]:not([hidden])`)))
			do(t, ctx, chromedp.Click(chromedp.CSS(`#panel-right .plot-head [data-show]:not([hidden])`)))
			// Click each target card.
			n := eval[int](t, ctx, `document.querySelectorAll('.tcard').length`)
			for i := range n {
				sel := fmt.Sprintf(`.tcard:nth-child(%d) .tcard-head b`, i+1)
				do(t, ctx, chromedp.ScrollIntoView(chromedp.CSS(sel)), chromedp.Click(chromedp.CSS(sel)))
				time.Sleep(300 * time.Millisecond)
				t.Logf("%s: card %d click: selected=%v", tag, i, eval[any](t, ctx, `window.__pw.editor.selected`))
			}
			shot(t, ctx, tag+"-02cards")
			// Click each marker on the profile.
			ids := eval[[]string](t, ctx, `window.__pw.frame().report.targets.map((t) => t.id)`)
			for _, id := range ids {
				ok := eval[bool](t, ctx, jsMarker+fmt.Sprintf(`(%q) !== undefined`, id))
				if !ok {
					t.Logf("%s: no marker for %s", tag, id)
					continue
				}
				p := markerPx(t, ctx, id)
				clickAt(t, ctx, "#chart-profile", p[0], p[1])
				time.Sleep(300 * time.Millisecond)
				t.Logf("%s: marker %s click → selected %v hover=%q", tag, id, eval[any](t, ctx, `window.__pw.editor.selected`), eval[string](t, ctx, `document.querySelector('#hover-card').hidden ? '' : document.querySelector('#hover-card').innerText`))
			}
			shot(t, ctx, tag+"-03markers")
			// Wheel over an empty plot area (zoom).
			ox, oy := chartOrigin(t, ctx, "#chart-profile")
			w := eval[[]float64](t, ctx, `(() => { const r = document.querySelector('#chart-profile').getBoundingClientRect(); return [r.width, r.height]; })()`)
			wheelAt(t, ctx, ox+w[0]*0.5, oy+w[1]*0.15, -300)
			time.Sleep(800 * time.Millisecond)
			shot(t, ctx, tag+"-04wheel")
			do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="pulse"]`)))
			time.Sleep(300 * time.Millisecond)
			shot(t, ctx, tag+"-05pulse")
			do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
			time.Sleep(300 * time.Millisecond)
			shot(t, ctx, tag+"-06receive")
			do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="radar"]`)))
			time.Sleep(300 * time.Millisecond)
			shot(t, ctx, tag+"-07radar")
			do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="scene"]`)))
			// Pin and nudge.
			do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-pin`)))
			waitFor(t, ctx, "pinned frame", `!!window.__pw.frame().reference`)
			eval[bool](t, ctx, `(window.__pw.editor.nudge(0, -3), true)`)
			waitFor(t, ctx, "nudged", fresh)
			time.Sleep(500 * time.Millisecond)
			shot(t, ctx, tag+"-08pinned")
			do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-pin`)))
			waitFor(t, ctx, "unpinned", fresh+` && !window.__pw.frame().reference`)
		}
	}
}

// TestExplore2: forms, errors, links, library, exports.
func TestExplore2(t *testing.T) {
	if os.Getenv("PW_EXPLORE") == "" {
		t.Skip("set PW_EXPLORE=1")
	}
	ctx := mustBrowserFor(t, 10*time.Minute)
	base := mustServer(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, base)
	waitFor(t, ctx, "settled", fresh)
	// Capture downloads.
	eval[bool](t, ctx, `(window.__dl = [], URL.createObjectURL = ((orig) => (b) => { b.text().then((txt) => window.__dl.push(txt.slice(0, 300))); return orig(b); })(URL.createObjectURL), true)`)
	// Wheel over empty plot area (lower right, away from markers).
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	w := eval[[]float64](t, ctx, `(() => { const r = document.querySelector('#chart-profile').getBoundingClientRect(); return [r.width, r.height]; })()`)
	mouse(t, ctx, chromedp.MouseMoved, ox+w[0]*0.3, oy+w[1]*0.75)
	wheelAt(t, ctx, ox+w[0]*0.3, oy+w[1]*0.75, -300)
	time.Sleep(900 * time.Millisecond)
	t.Logf("zoom after wheel: %v", eval[any](t, ctx, `window.__pw.plots.charts.profile.getOption().dataZoom.map((d) => [d.start, d.end])`))
	shot(t, ctx, "01wheel-empty")
	// Focus select.
	do(t, ctx, chromedp.Evaluate[chromedp.Void](`(() => { const s = document.querySelector('#focus-select'); s.value = s.options[1].value; s.dispatchEvent(new Event('change', {bubbles: true})); })()`))
	time.Sleep(900 * time.Millisecond)
	shot(t, ctx, "02focus")
	// Pulse tab: invalid pulse width.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="pulse"]`)))
	sel := `input[data-path="waveform.pulse_width_s"]`
	for i, v := range []string{"abc", "0", "-3", "1e9", "20"} {
		typeInto(t, ctx, sel, v)
		time.Sleep(1200 * time.Millisecond)
		t.Logf("pulse width %q: err=%q orphan=%q notice=%q banner=%q", v,
			eval[string](t, ctx, `(document.querySelector('[data-err-for="waveform.pulse_width_s"]')||{}).textContent||''`),
			eval[string](t, ctx, `document.querySelector('#orphan-errors').textContent`),
			eval[string](t, ctx, `document.querySelector('#notice').hidden ? '' : document.querySelector('#notice-text').textContent`),
			eval[string](t, ctx, `document.querySelector('.stale-banner').hidden ? '' : document.querySelector('.stale-banner').textContent`))
		shot(t, ctx, fmt.Sprintf("03pw%d", i))
	}
	// Each waveform kind.
	kinds := eval[[]string](t, ctx, `[...document.querySelector('select[data-action^="waveform-kind"]').options].map((o) => o.value)`)
	for i, k := range kinds {
		setSelect(t, ctx, `select[data-action^="waveform-kind"]`, k)
		time.Sleep(1500 * time.Millisecond)
		t.Logf("kind %s: errs=%q banner=%q", k, eval[string](t, ctx, `[...document.querySelectorAll('.err')].map((e) => e.textContent).filter(Boolean).join(' | ')`),
			eval[string](t, ctx, `document.querySelector('.stale-banner').hidden ? '' : document.querySelector('.stale-banner').textContent`))
		do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="pulse"]`)))
		do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="filter"]`)))
		time.Sleep(600 * time.Millisecond)
		shot(t, ctx, fmt.Sprintf("04kind%d-%s", i, k))
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	for _, act := range []string{`select[data-action^="filter"]`, `select[data-action="window-kind:receiver.window"]`, `select[data-action^="detector"]`} {
		if !eval[bool](t, ctx, fmt.Sprintf(`!!document.querySelector(%q)`, act)) {
			t.Logf("no %s; selects: %v", act, eval[any](t, ctx, `[...document.querySelectorAll('[data-panel="receive"] select')].map((s) => s.dataset.action)`))
			continue
		}
		opts := eval[[]string](t, ctx, fmt.Sprintf(`[...document.querySelector(%q).options].map((o) => o.value)`, act))
		for i, k := range opts {
			setSelect(t, ctx, act, k)
			time.Sleep(1500 * time.Millisecond)
			t.Logf("%s = %s: errs=%q banner=%q", act, k, eval[string](t, ctx, `[...document.querySelectorAll('.err')].map((e) => e.textContent).filter(Boolean).join(' | ')`),
				eval[string](t, ctx, `document.querySelector('.stale-banner').hidden ? '' : document.querySelector('.stale-banner').textContent`))
			shot(t, ctx, fmt.Sprintf("05rx-%s-%d-%s", strings.Split(act, "\"")[1][:6], i, k))
		}
	}
	// Pfa invalid.
	typeInto(t, ctx, `input[data-path="receiver.detector.pfa"]`, "0.5")
	time.Sleep(1200 * time.Millisecond)
	t.Logf("pfa 0.5: %q", eval[string](t, ctx, `[...document.querySelectorAll('.err')].map((e) => e.textContent).filter(Boolean).join(' | ')`))
	shot(t, ctx, "06pfa")
	typeInto(t, ctx, `input[data-path="receiver.detector.pfa"]`, "1e-6")
	// Exports.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-csv`)), chromedp.Click(chromedp.CSS(`#btn-export`)), chromedp.Click(chromedp.CSS(`[data-png="profile"]`)))
	time.Sleep(1500 * time.Millisecond)
	t.Logf("downloads: %v", eval[any](t, ctx, `window.__dl`))
	// Copy link.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-share`)))
	time.Sleep(800 * time.Millisecond)
	t.Logf("copy link notice: %q", eval[string](t, ctx, `document.querySelector('#notice').hidden ? '' : document.querySelector('#notice').innerText`))
	shot(t, ctx, "07copylink")
	link := eval[string](t, ctx, `window.__pw.frame().link`)
	ctx2 := newTab(t, ctx)
	do(t, ctx2, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx2, base+link)
	waitFor(t, ctx2, "settled", fresh)
	shot(t, ctx2, "08second-tab")
	// Library.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-library`)))
	typeInto(t, ctx, `#lib-name`, "meeting scene")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-save`)))
	time.Sleep(800 * time.Millisecond)
	t.Logf("library msg: %q rows %q", eval[string](t, ctx, `document.querySelector('#lib-msg').textContent`), eval[string](t, ctx, `document.querySelector('#lib-rows').innerText`))
	shot(t, ctx, "09library")
	typeInto(t, ctx, `#lib-name`, "meeting-scene")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#lib-save`)))
	time.Sleep(800 * time.Millisecond)
	t.Logf("library msg: %q rows %q", eval[string](t, ctx, `document.querySelector('#lib-msg').textContent`), eval[string](t, ctx, `document.querySelector('#lib-rows').innerText`))
	shot(t, ctx, "10library")
	do(t, ctx, chromedp.Reload())
	waitFor(t, ctx, "reloaded", `window.__pw && window.__pw.frame() && window.__pw.frame().report`)
	shot(t, ctx, "11reloaded")
	t.Logf("after reload scene %q pw %v", eval[string](t, ctx, `window.__pw.store.scenario.name`), eval[any](t, ctx, `window.__pw.store.scenario.waveform`))
}

// TestExplore3: drags on other demos, units, CSV.
func TestExplore3(t *testing.T) {
	if os.Getenv("PW_EXPLORE") == "" {
		t.Skip("set PW_EXPLORE=1")
	}
	ctx := mustBrowserFor(t, 10*time.Minute)
	base := mustServer(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, base)
	eval[bool](t, ctx, `(window.__dl = [], URL.createObjectURL = ((orig) => (b) => { b.text().then((txt) => window.__dl.push(txt.slice(0, 400))); return orig(b); })(URL.createObjectURL), true)`)
	for _, d := range []string{"long-pulse-blind", "hill-clutter-doppler", "squall-line"} {
		loadDemo(t, ctx, d)
		waitFor(t, ctx, "settled", fresh)
		ids := eval[[]string](t, ctx, `window.__pw.frame().report.targets.map((t) => t.id)`)
		for _, id := range ids {
			if !eval[bool](t, ctx, jsMarker+fmt.Sprintf(`(%q) !== undefined`, id)) {
				continue
			}
			p := markerPx(t, ctx, id)
			ox, oy := chartOrigin(t, ctx, "#chart-profile")
			x, y := ox+p[0], oy+p[1]
			before := eval[any](t, ctx, fmt.Sprintf(`JSON.stringify(window.__pw.store.scenario.targets.find((t) => t.id === %q))`, id))
			mouse(t, ctx, chromedp.MouseMoved, x, y)
			mouse(t, ctx, chromedp.MousePressed, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
			for i := 1; i <= 6; i++ {
				mouse(t, ctx, chromedp.MouseMoved, x+40*float64(i)/6, y, held)
			}
			mouse(t, ctx, chromedp.MouseReleased, x+40, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
			waitFor(t, ctx, "settled", fresh)
			after := eval[any](t, ctx, fmt.Sprintf(`JSON.stringify(window.__pw.store.scenario.targets.find((t) => t.id === %q))`, id))
			q := markerPx(t, ctx, id)
			t.Logf("%s drag %s: %v → %v; marker px %.0f → %.0f (want +40)", d, id, before, after, p[0], q[0])
			shot(t, ctx, d+"-drag-"+id)
			do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-undo`)))
			waitFor(t, ctx, "settled", fresh)
		}
	}
	// Units: km, kt.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#units-pick summary`)))
	pickDown(t, ctx, "range", 1)
	pickDown(t, ctx, "speed", 2)
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plots`)))
	time.Sleep(800 * time.Millisecond)
	shot(t, ctx, "units-km-kt")
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="radar"]`)))
	time.Sleep(300 * time.Millisecond)
	shot(t, ctx, "units-km-kt-radar")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-csv`)))
	time.Sleep(800 * time.Millisecond)
	t.Logf("csv: %v", eval[any](t, ctx, `window.__dl`))
}

func TestExplore4(t *testing.T) {
	if os.Getenv("PW_EXPLORE") == "" {
		t.Skip("set PW_EXPLORE=1")
	}
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "settled", fresh)
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	w := eval[[]float64](t, ctx, `(() => { const r = document.querySelector('#chart-profile').getBoundingClientRect(); return [r.width, r.height]; })()`)
	x, y := ox+w[0]*0.3, oy+w[1]*0.75
	mouse(t, ctx, chromedp.MouseMoved, x, y)
	mouse(t, ctx, chromedp.MouseMoved, x+2, y)
	time.Sleep(500 * time.Millisecond)
	shot(t, ctx, "hover")
	t.Logf("fast active %v behind %v", eval[any](t, ctx, `window.__pw.plots.fasts.profile.active`), eval[any](t, ctx, `[...window.__pw.plots.behind]`))
	wheelAt(t, ctx, x+2, y, -300)
	time.Sleep(1500 * time.Millisecond)
	t.Logf("fast active %v behind %v", eval[any](t, ctx, `window.__pw.plots.fasts.profile.active`), eval[any](t, ctx, `[...window.__pw.plots.behind]`))
	shot(t, ctx, "hover-zoom")
	t.Logf("canvases: %v", eval[any](t, ctx, `[...document.querySelectorAll('#chart-profile canvas')].map((c) => [c.className, c.style.zIndex, c.hidden, c.getAttribute('data-zr-dom-id')])`))
}
