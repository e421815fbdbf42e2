package web_test

import (
	"bytes"
	"compress/flate"
	"context"
	"encoding/base64"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// Browser tests of the page's robustness: bad scenarios from files and
// links, and what the page keeps of the user's work when it meets one.

// demoWith returns the harbour-skiff demo's JSON with edit applied to it
// as a generic map.
func demoWith(t *testing.T, edit func(m map[string]any)) []byte {
	t.Helper()
	raw, err := os.ReadFile("../scenarios/demos/harbour-skiff.json")
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(raw, &m); err != nil {
		t.Fatal(err)
	}
	edit(m)
	out, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// linkOf encodes a scenario document as a share link fragment, "#s=…",
// the way the server does (raw DEFLATE, base64url without padding), but
// without validating it first.
func linkOf(t *testing.T, doc []byte) string {
	t.Helper()
	var buf bytes.Buffer
	zw, err := flate.NewWriter(&buf, flate.BestCompression)
	if err != nil {
		t.Fatal(err)
	}
	zw.Write(doc)
	zw.Close()
	return "#s=" + base64.RawURLEncoding.EncodeToString(buf.Bytes())
}

// badScenes are valid scenes spoiled at a top-level or unknown path.
func badScenes(t *testing.T) []struct {
	name, path string
	doc        []byte
} {
	return []struct {
		name, path string
		doc        []byte
	}{
		{"version-4", "version", demoWith(t, func(m map[string]any) { m["version"] = 4 })},
		{"unknown-top", "colour", demoWith(t, func(m map[string]any) { m["colour"] = "red" })},
		{"unknown-nested", "mti", demoWith(t, func(m map[string]any) { m["receiver"] = map[string]any{"mti": "four_pulse"} })},
	}
}

// alive fails the test when the page's main thread does not answer
// within a few seconds (a frozen tab).
func alive(t *testing.T, ctx context.Context, what string) {
	t.Helper()
	c, cancel := context.WithTimeout(ctx, 5*time.Second)
	defer cancel()
	if _, err := chromedp.Run(c, chromedp.Evaluate[int](`1 + 1`)); err != nil {
		t.Fatalf("%s: the page does not answer (frozen main thread?): %v", what, err)
	}
}

func TestBadImportKeepsPageAndScene(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	typeInto(t, ctx, `tr[data-row="2"] input[data-path="targets[2].rcs_dbsm"]`, "17.5")
	waitFor(t, ctx, "the edit's frame", fresh+` && window.__pw.store.scenario.targets[2].rcs_dbsm === 17.5`)
	dir := t.TempDir()
	for _, bad := range badScenes(t) {
		p := filepath.Join(dir, bad.name+".json")
		if err := os.WriteFile(p, bad.doc, 0o644); err != nil {
			t.Fatal(err)
		}
		do(t, ctx, chromedp.SetUploadFiles(chromedp.CSS(`#file-import`), []string{p}))
		waitFor(t, ctx, bad.name+" notice", `!document.querySelector('#notice').hidden && document.querySelector('#notice-text').textContent.includes('`+bad.name+`.json')`)
		alive(t, ctx, bad.name)
		txt := eval[string](t, ctx, `document.querySelector('#notice-text').textContent`)
		if !strings.Contains(txt, bad.path) {
			t.Errorf("%s: the notice %q does not name the field %q", bad.name, txt, bad.path)
		}
		if v := eval[float64](t, ctx, `window.__pw.store.scenario.targets[2].rcs_dbsm`); v != 17.5 {
			t.Errorf("%s: the scene was replaced (rcs %g)", bad.name, v)
		}
		if v := eval[string](t, ctx, `document.querySelector('input[data-path="targets[2].rcs_dbsm"]').value`); v != "17.5" {
			t.Errorf("%s: the editor shows rcs %q, want the kept 17.5", bad.name, v)
		}
		shot(t, ctx, bad.name)
		do(t, ctx, chromedp.Click(chromedp.CSS(`#notice-close`)))
	}
	// The editor's own guard, behind the check above: refusals at a
	// top-level or unknown path that reach it find no field and come back
	// as the page's own messages, without freezing the page.
	c, cancel := context.WithTimeout(ctx, 5*time.Second)
	defer cancel()
	orphans, err := chromedp.Run(c, chromedp.Evaluate[[]string](`window.__pw.editor.showErrors([{path: 'version', message: '4 is not supported'}, {path: 'colour', message: 'unknown field'}])`))
	if err != nil {
		t.Fatalf("the editor's messages for top-level paths: %v (frozen page?)", err)
	}
	if len(orphans) != 2 {
		t.Errorf("messages without a field: %q, want the two top-level ones", orphans)
	}
}

func TestBadLinkOnOpenShowsMessageAndScene(t *testing.T) {
	ctx := mustBrowser(t)
	base := mustServer(t)
	for _, bad := range badScenes(t) {
		tab := newTab(t, ctx)
		do(t, tab, chromedp.Navigate(base+"/"+linkOf(t, bad.doc)))
		waitFor(t, tab, bad.name+" notice", `!document.querySelector('#notice').hidden && document.querySelector('#notice-text').textContent.includes('cannot be')`)
		alive(t, tab, bad.name)
		if txt := eval[string](t, tab, `document.querySelector('#notice-text').textContent`); !strings.Contains(txt, bad.path) {
			t.Errorf("%s: the notice %q does not name the field %q", bad.name, txt, bad.path)
		}
		// A scene is shown, with its plots: not an empty page.
		waitFor(t, tab, bad.name+" plots", `window.__pw.frame() && window.__pw.plots.charts.profile.getOption().series.find((s) => s.id === 'profile').data.length > 0`)
		shot(t, tab, bad.name)
		closeTab(tab)
	}
}

func TestPastedBadLinkKeepsWork(t *testing.T) {
	ctx := mustBrowser(t)
	base := mustServer(t)
	openPage(t, ctx, base)
	typeInto(t, ctx, `tr[data-row="2"] input[data-path="targets[2].rcs_dbsm"]`, "17.5")
	waitFor(t, ctx, "the edit's frame", fresh+` && window.__pw.store.scenario.targets[2].rcs_dbsm === 17.5`)
	waitFor(t, ctx, "the address", `location.hash === window.__pw.frame().link.slice(1)`)
	good := eval[string](t, ctx, `location.hash`)
	// Paste a link to a scene the server refuses into the address bar: a
	// same-document navigation.
	bad := badScenes(t)[1]
	do(t, ctx, chromedp.Navigate(base+"/"+linkOf(t, bad.doc)))
	waitFor(t, ctx, "the refusal", `!document.querySelector('#notice').hidden && document.querySelector('#notice-text').textContent.includes('cannot be')`)
	alive(t, ctx, "pasted link")
	time.Sleep(500 * time.Millisecond) // let any second navigation event act
	if v := eval[float64](t, ctx, `window.__pw.store.scenario.targets[2].rcs_dbsm`); v != 17.5 {
		t.Errorf("the pasted link replaced the scene (rcs %g)", v)
	}
	if eval[bool](t, ctx, `'colour' in window.__pw.store.scenario`) {
		t.Error("the editor holds the refused scene")
	}
	if v := eval[string](t, ctx, `document.querySelector('input[data-path="targets[2].rcs_dbsm"]').value`); v != "17.5" {
		t.Errorf("the editor shows rcs %q, want the kept 17.5", v)
	}
	if h := eval[string](t, ctx, `location.hash`); h != good {
		t.Errorf("address after the refused link = %.40s…, want the kept scene's %.40s…", h, good)
	}
	shot(t, ctx, "refused")
	// Undo takes back the user's own edit, not a phantom link step.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-undo`)))
	waitFor(t, ctx, "undo of the edit", `window.__pw.store.scenario.targets[2].rcs_dbsm !== 17.5 && !('colour' in window.__pw.store.scenario)`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-redo`)))
	// A reload opens the kept scene.
	waitFor(t, ctx, "the redone frame", fresh+` && window.__pw.store.scenario.targets[2].rcs_dbsm === 17.5`)
	do(t, ctx, chromedp.Reload())
	waitFor(t, ctx, "the reloaded scene", `window.__pw && window.__pw.store.scenario && window.__pw.store.scenario.targets[2].rcs_dbsm === 17.5`)
}

// TestNudgesOnlyWhenNudging: arrow keys change a target only while the
// profile plot (after a click or wheel on it) or a level field has the
// focus; a wheel gesture over a marker changes its level notch by notch
// and never zooms the plot.
func TestNudgesOnlyWhenNudging(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the start scene", jsMarker+`('pilot-boat')`)
	const rcs = `window.__pw.store.scenario.targets[2].rcs_dbsm`
	rcs0 := eval[float64](t, ctx, rcs)
	// Select the pilot boat by clicking its row, then click a button and
	// press ↓: nothing changes.
	// The table is rebuilt after the first frame's paint; a click on a
	// row replaced under it is tried again.
	for try := 0; ; try++ {
		err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`tr[data-row="2"] td:first-child`)))
		if err == nil || try == 4 {
			if err != nil {
				t.Fatal(err)
			}
			break
		}
		time.Sleep(200 * time.Millisecond)
	}
	waitFor(t, ctx, "row 2 selected", `window.__pw.editor.selected === 2`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-pin`)), chromedp.KeyEvent(kb.ArrowDown), chromedp.KeyEvent(kb.ArrowUp), chromedp.KeyEvent(kb.ArrowUp))
	// Click the figures panel and press ↓ to scroll it.
	do(t, ctx, chromedp.Click(chromedp.CSS(`#figures h3`)), chromedp.KeyEvent(kb.ArrowDown), chromedp.KeyEvent(kb.ArrowDown), chromedp.KeyEvent(kb.ArrowDown))
	time.Sleep(300 * time.Millisecond)
	if v := eval[float64](t, ctx, rcs); v != rcs0 {
		t.Errorf("arrow keys on a button and in the figures panel changed the pilot boat's RCS from %g to %g", rcs0, v)
	}
	// ←/→ in a level field move the caret, not the target.
	r0 := eval[float64](t, ctx, `window.__pw.store.scenario.targets[2].range_m`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`tr[data-row="2"] input[data-level]`)), chromedp.KeyEvent(kb.ArrowLeft), chromedp.KeyEvent(kb.ArrowRight))
	time.Sleep(200 * time.Millisecond)
	if r := eval[float64](t, ctx, `window.__pw.store.scenario.targets[2].range_m`); r != r0 {
		t.Errorf("←/→ in the level field moved the target from %g m to %g m", r0, r)
	}
	// ↑ in the level field nudges it.
	do(t, ctx, chromedp.KeyEvent(kb.ArrowUp))
	waitFor(t, ctx, "one nudge up in the level field", fmt.Sprintf(`%s === %g`, rcs, rcs0+1))
	shot(t, ctx, "keys")

	// A wheel gesture of six notches over the skiff's marker.
	waitFor(t, ctx, "in step", fresh)
	s0 := eval[float64](t, ctx, `window.__pw.store.scenario.targets[1].rcs_dbsm`)
	p := markerPx(t, ctx, "skiff")
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	mouse(t, ctx, chromedp.MouseMoved, ox+p[0], oy+p[1])
	for range 6 {
		wheelAt(t, ctx, ox+p[0], oy+p[1], -100)
		time.Sleep(60 * time.Millisecond)
	}
	waitFor(t, ctx, "six notches", fmt.Sprintf(`window.__pw.store.scenario.targets[1].rcs_dbsm === %g`, s0+6))
	time.Sleep(300 * time.Millisecond)
	if v := eval[float64](t, ctx, `window.__pw.store.scenario.targets[1].rcs_dbsm`); v != s0+6 {
		t.Errorf("six wheel notches changed the skiff's RCS by %g dB, want 6", v-s0)
	}
	if z := eval[[]float64](t, ctx, `(() => { const d = window.__pw.plots.charts.profile.getOption().dataZoom[0]; return [d.start, d.end]; })()`); z[0] != 0 || z[1] != 100 {
		t.Errorf("the wheel over a marker zoomed the profile to %v %%", z)
	}
	// The profile now has the focus: ↓ nudges the skiff.
	do(t, ctx, chromedp.KeyEvent(kb.ArrowDown))
	waitFor(t, ctx, "one key step down", fmt.Sprintf(`window.__pw.store.scenario.targets[1].rcs_dbsm === %g`, s0+5))
	shot(t, ctx, "wheel")
}

// TestMarkerClickAndQuietPage: clicking a marker raises no exception in
// the page (the harness fails the test on any), the figures panel shows
// no stray "null", and the page's icon is served.
func TestMarkerClickAndQuietPage(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the start scene", jsMarker+`('skiff')`)
	eval[bool](t, ctx, `(window.__errs = [], addEventListener('error', (e) => window.__errs.push(String(e.message))), addEventListener('unhandledrejection', (e) => window.__errs.push(String(e.reason))),
		((ce) => { console.error = (...a) => { window.__errs.push(a.map(String).join(' ')); ce(...a); }; })(console.error), true)`)
	for _, id := range []string{"skiff", "tanker", "pilot-boat"} {
		p := markerPx(t, ctx, id)
		ox, oy := chartOrigin(t, ctx, "#chart-profile")
		// A click as a hand makes it: no hover first, then a second click.
		for range 2 {
			mouse(t, ctx, chromedp.MousePressed, ox+p[0], oy+p[1], chromedp.ButtonLeft, chromedp.ClickCount(1))
			mouse(t, ctx, chromedp.MouseReleased, ox+p[0], oy+p[1], chromedp.ButtonLeft, chromedp.ClickCount(1))
		}
		clickAt(t, ctx, "#chart-profile", p[0], p[1])
		waitFor(t, ctx, id+" selected", fmt.Sprintf(`window.__pw.store.scenario.targets[window.__pw.editor.selected].id === %q`, id))
	}
	time.Sleep(300 * time.Millisecond)
	if errs := eval[[]string](t, ctx, `window.__errs`); len(errs) > 0 {
		t.Errorf("errors in the page after clicking markers: %v", errs)
	}
	if txt := eval[string](t, ctx, `document.querySelector('#figures').innerText`); strings.Contains(txt, "null") || strings.Contains(txt, "undefined") {
		t.Errorf("figures panel shows a stray null/undefined: %q", txt)
	}
	icon := eval[string](t, ctx, `(document.querySelector('link[rel~="icon"]') || {}).href || ''`)
	if icon == "" {
		t.Fatal("the page names no icon, so the browser asks for /favicon.ico")
	}
	if st := eval[int](t, ctx, fmt.Sprintf(`fetch(%q).then((r) => r.status)`, icon)); st != 200 {
		t.Errorf("icon %s: status %d", icon, st)
	}
	shot(t, ctx, "")
}
