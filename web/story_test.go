package web_test

import (
	"context"
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestSceneStoryOnScreen: the scene's notes and the masked target's reason
// are on screen; notes the user writes travel with the share link.
func TestSceneStoryOnScreen(t *testing.T) {
	ctx := mustBrowserFor(t, 150*time.Second) // two page loads and typing: 51 s alone at load 28, over 60 s beside other tests
	base := mustServer(t)
	openPage(t, ctx, base)
	waitFor(t, ctx, "the skiff masked", jsTarget+`('skiff').status === 'masked'`)
	waitFor(t, ctx, "the story", `!!document.querySelector('.story .story-masked')`)
	story := eval[string](t, ctx, `document.querySelector('.story').innerText`)
	for _, want := range []string{"Harbour approach: skiff beside a tanker", "Try a Taylor window", "skiff", "hidden by tanker", "A Taylor window ("} {
		if !strings.Contains(story, want) {
			t.Errorf("the story on screen lacks %q:\n%s", want, story)
		}
	}
	// The story is in view without scrolling.
	if !eval[bool](t, ctx, `(() => { const r = document.querySelector('.story-masked').getBoundingClientRect(); return r.top >= 0 && r.bottom <= innerHeight; })()`) {
		t.Error("the masked target's reason is not in view")
	}
	shot(t, ctx, "harbour")

	// Write a note of one's own, in the Scene tab, with the keyboard.
	const notes = `textarea[data-path="notes"]`
	do(t, ctx, chromedp.Click(chromedp.CSS(notes)))
	typeInto(t, ctx, notes, "Customer demo: the skiff hides in the tanker's sidelobes.")
	waitFor(t, ctx, "the note in the story", `document.querySelector('.story').innerText.includes('Customer demo')`)
	waitFor(t, ctx, "the note's frame", fresh+` && window.__pw.store.scenario.notes === "Customer demo: the skiff hides in the tanker's sidelobes."`)
	link := eval[string](t, ctx, `window.__pw.frame().link`)
	tab := newTab(t, ctx)
	openPage(t, tab, base+link)
	waitFor(t, tab, "the linked note", `document.querySelector('.story').innerText.includes('Customer demo: the skiff hides')`)
	if v := eval[string](t, tab, `document.querySelector('textarea[data-path="notes"]').value`); v != "Customer demo: the skiff hides in the tanker's sidelobes." {
		t.Errorf("the linked scene's notes field holds %q", v)
	}
	shot(t, tab, "linked-note")
}

// setSelect picks a value in a menu and fires its change event, as a pick
// with the keyboard does.
func setSelect(t *testing.T, ctx context.Context, sel, value string) {
	t.Helper()
	do(t, ctx, chromedp.Focus(chromedp.CSS(sel)), chromedp.SetValue(chromedp.CSS(sel), value),
		chromedp.Evaluate[chromedp.Void](fmt.Sprintf(`document.querySelector(%q).dispatchEvent(new Event('change', {bubbles: true}))`, sel)))
}

// TestWordsAndUnits: messages give units; menus and panels show names,
// not identifiers; a mismatched filter is offered only where it applies;
// Pfa reads in scientific notation; typed phases replace the binary code.
func TestWordsAndUnits(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="radar"]`)))
	typeInto(t, ctx, `input[data-path="radar.window_stop_m"]`, "1000")
	const stop = `document.querySelector('[data-err-for="radar.window_stop_m"]').textContent`
	// The field validates as it is typed ("1", "10", "100" are refused
	// too), so wait for the message about the whole value.
	waitFor(t, ctx, "the window error about 1000", stop+`.includes('1000')`)
	if msg := eval[string](t, ctx, stop); !strings.Contains(msg, "1000 m") || !strings.Contains(msg, "3500 m") {
		t.Errorf("window stop message %q: want metres on both numbers", msg)
	}
	shot(t, ctx, "units")
	typeInto(t, ctx, `input[data-path="radar.window_stop_m"]`, "9000")
	waitFor(t, ctx, "in step", fresh+` && `+stop+` === ''`)

	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	const filterOpts = `[...document.querySelectorAll('select[data-path="receiver.filter"] option')].map((o) => o.value + '=' + o.textContent)`
	opts := eval[[]string](t, ctx, filterOpts)
	if len(opts) != 1 {
		t.Errorf("filters offered for an LFM: %v, want only the matched filter", opts)
	}
	if v := eval[string](t, ctx, `document.querySelector('input[data-path="receiver.detector.pfa"]').value || document.querySelector('input[data-path="receiver.detector.pfa"]').placeholder`); v != "1e-6" {
		t.Errorf("Pfa shown as %q, want 1e-6", v)
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="pulse"]`)))
	setSelect(t, ctx, `select[data-action="waveform-kind"]`, "barker")
	waitFor(t, ctx, "the Barker frame", fresh+` && window.__pw.frame().report.waveform.kind === 'barker'`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	opts = eval[[]string](t, ctx, filterOpts)
	if len(opts) != 3 {
		t.Errorf("filters offered for a Barker code: %v, want three", opts)
	}
	setSelect(t, ctx, `select[data-path="receiver.filter"]`, "least_squares")
	waitFor(t, ctx, "the mismatched frame", fresh+` && window.__pw.store.scenario.receiver.filter === 'least_squares'`)
	shot(t, ctx, "mismatched")
	// Back to an LFM: the mismatched filter goes, and nothing is refused.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="pulse"]`)))
	setSelect(t, ctx, `select[data-action="waveform-kind"]`, "lfm")
	waitFor(t, ctx, "the LFM frame", fresh+` && window.__pw.frame().report.waveform.kind === 'lfm'`)
	if f := eval[string](t, ctx, `window.__pw.store.scenario.receiver.filter || 'matched'`); f != "matched" {
		t.Errorf("filter after going back to an LFM: %q", f)
	}
	// An own phase code: typed phases replace the binary code.
	setSelect(t, ctx, `select[data-action="waveform-kind"]`, "phase_code")
	waitFor(t, ctx, "the phase-code frame", fresh+` && window.__pw.frame().report.waveform.kind === 'phase_code'`)
	typeInto(t, ctx, `textarea[data-path="waveform.phases_deg"]`, "0, 90, 180")
	waitFor(t, ctx, "the phases' frame", fresh+` && JSON.stringify(window.__pw.store.scenario.waveform.phases_deg) === '[0,90,180]'`)
	if errs := eval[string](t, ctx, `[...document.querySelectorAll('[data-err-for]')].map((e) => e.textContent).join('')`); errs != "" {
		t.Errorf("errors after typing three phases: %q", errs)
	}
	if eval[bool](t, ctx, `'binary' in window.__pw.store.scenario.waveform`) {
		t.Error("the binary code stayed beside the typed phases")
	}
	shot(t, ctx, "phases")
	// No identifiers on screen; the card numbers are explained.
	text := eval[string](t, ctx, `document.body.innerText`)
	for _, id := range []string{"least_squares", "swerling1", "ca_cfar", "below_noise", "too_weak", "out_of_window", "P_fa", "phase_code"} {
		if strings.Contains(text, id) {
			t.Errorf("the page shows the identifier %q", id)
		}
	}
	if help := eval[string](t, ctx, `(document.querySelector('.nums-help') || {}).textContent || ''`); !strings.Contains(help, "margin") || !strings.Contains(help, "SNR") {
		t.Errorf("the cards' numbers are not explained: %q", help)
	}
}

// TestCautionShowsWhole: the RF-exposure and spectrum caution is on
// screen whole at 1280×720 and 1600×1000.
func TestCautionShowsWhole(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	for _, size := range [][2]int64{{1280, 720}, {1600, 1000}} {
		do(t, ctx, chromedp.EmulateViewport(size[0], size[1]))
		ok := eval[bool](t, ctx, `(() => { const s = [...document.querySelectorAll('.foot > span')].find((e) => e.textContent.includes('RF exposure'));
			const r = s.getBoundingClientRect(); return s.scrollWidth <= s.clientWidth + 1 && r.right <= innerWidth && r.bottom <= innerHeight && r.width > 0; })()`)
		if !ok {
			t.Errorf("%dx%d: the RF caution is cut or off screen", size[0], size[1])
		}
	}
}
