package web_test

import (
	"math"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// Statuses on Pd, on the page: the harbour skiff's card shows its Pd
// with its Pd alone (masked by the tanker: Pd 0.025, > 0.999 alone), the
// pilot boat's its Pd 0.722 (masked by its own sidelobes, so no other
// "alone"), their dots have the masked shape, and lowering the required Pd in the detector form with
// real key presses to 0.7 makes it detected. Then the long-pulse-blind
// scene's far airliner is folded: its card says so (its Pd is its ghost's) and its marker, a pin,
// sits where its ghost appears (60.1 km), not at the window's edge.
func TestPdOnCardsAndRequiredPd(t *testing.T) {
	ctx := mustBrowserFor(t, 3*time.Minute) // three scenes, two tabs
	base := mustServer(t)
	openPage(t, ctx, base)
	waitFor(t, ctx, "the pilot boat masked", jsTarget+`('pilot-boat').status === 'masked'`)
	card := `document.querySelector('.tcard[data-target="pilot-boat"]')`
	waitFor(t, ctx, "the pilot boat's card", card+` && `+card+`.textContent.includes('Pd 0.722')`)
	if txt := eval[string](t, ctx, `document.querySelector('.tcard[data-target="skiff"] .pd').textContent`); txt != "Pd 0.025 (alone > 0.999)" {
		t.Errorf("skiff's Pd on its card: %q", txt)
	}
	if txt := eval[string](t, ctx, card+`.querySelector('.tcard-head').textContent`); !strings.Contains(txt, "masked") {
		t.Errorf("card head %q", txt)
	}
	if n := eval[int](t, ctx, `document.querySelectorAll('#ed-targets .dot.st-masked').length`); n != 2 {
		t.Errorf("%d masked dots in the target table, want 2 (skiff, pilot boat)", n)
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	typeInto(t, ctx, `input[data-path="receiver.detector.pd_required"]`, "0.7")
	waitFor(t, ctx, "the pilot boat detected at Pd 0.7", jsTarget+`('pilot-boat').status === 'detected' && window.__pw.store.scenario.receiver.detector.pd_required === 0.7`)
	waitFor(t, ctx, "its card follows", card+`.classList.contains('st-detected') && `+card+`.textContent.includes('Pd 0.722')`)
	if st := eval[string](t, ctx, jsTarget+`('skiff').status`); st != "masked" {
		t.Errorf("skiff %s at Pd 0.7, want still masked (Pd 0.025)", st)
	}
	shot(t, ctx, "pd-required")
	eval[bool](t, ctx, `(() => { `+card+`.scrollIntoView({block: 'center'}); return true; })()`)
	shot(t, ctx, "cards")

	jsLoad(t, ctx, `fetch('/api/v1/demos/long-pulse-blind').then((r) => r.json())`)
	waitFor(t, ctx, "the folded airliner", jsTarget+`('airliner-far').status === 'folded'`)
	m := eval[map[string]any](t, ctx, jsMarker+`('airliner-far')`)
	v, _ := m["value"].([]any)
	x, _ := v[0].(float64)
	ru := eval[float64](t, ctx, `window.__pw.frame().report.waveform.unambiguous_range_m`)
	if math.Abs(x-(210000-ru)) > 1 || m["symbol"] != "pin" {
		t.Errorf("folded marker %v at %.0f m, want a pin at %.0f m", m["symbol"], x, 210000-ru)
	}
	if txt := eval[string](t, ctx, `document.querySelector('.tcard[data-target="airliner-far"] .status').textContent`); txt != "folded" {
		t.Errorf("folded card status %q", txt)
	}
	// Its Pd is its ghost's, at the wrong range: the card says so.
	if txt := eval[string](t, ctx, `document.querySelector('.tcard[data-target="airliner-far"] .pd').textContent`); txt != "ghost Pd > 0.999" {
		t.Errorf("folded card Pd %q, want \"ghost Pd > 0.999\"", txt)
	}
	shot(t, ctx, "folded")

	// A version 1 link opens, and the figures panel's warnings name the
	// dinghy, detected under version 1's rules and too weak under version 2's.
	link, err := os.ReadFile("../scenarios/testdata/formats/v1/marina.link")
	if err != nil {
		t.Fatal(err)
	}
	tab := newTab(t, ctx)
	openPage(t, tab, base+strings.TrimSpace(string(link)))
	waitFor(t, tab, "the version 1 scene", jsTarget+`('dinghy') && `+jsTarget+`('dinghy').status === 'too_weak'`)
	waitFor(t, tab, "the verdict change in the warnings", `document.querySelector('.warnings').innerText.includes('target dinghy: read from a format version 1 document, whose rules called it detected; version 2 calls it too_weak')`)
	eval[bool](t, tab, `(() => { document.querySelector('.warnings').scrollIntoView({block: 'center'}); return true; })()`)
	shot(t, tab, "version1-link")
}
