package web_test

import (
	"fmt"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestCardClickSelectsTarget: a click on a target's card in the figures
// panel (or on a masked target's reason above it) selects that target, as
// a click on its marker does: its row and form in the Scene tab (shown,
// if another tab was), its card marked. The cards did nothing when
// clicked.
func TestCardClickSelectsTarget(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the cards", fresh+` && document.querySelectorAll('.tcard[data-target]').length === 3`)
	// The user was in the Receive tab.
	do(t, ctx, chromedp.Click(chromedp.CSS(`.tabs [data-tab="receive"]`)))
	for _, c := range []struct {
		sel, id string
		i       int
	}{
		{`.tcard[data-target="tanker"] .tcard-nums`, "tanker", 0},
		{`.tcard[data-target="pilot-boat"] .reason`, "pilot-boat", 2},
		{`.story-masked[data-target="skiff"] p`, "skiff", 1},
	} {
		do(t, ctx, chromedp.ScrollIntoView(chromedp.CSS(c.sel)), chromedp.Click(chromedp.CSS(c.sel)))
		waitFor(t, ctx, c.id+" selected", fmt.Sprintf(`window.__pw.editor.selected === %d && document.querySelector('.detail-head').textContent.includes(%q)
			&& !document.querySelector('[data-panel="scene"]').hidden && document.querySelector('tr[data-row="%d"]').classList.contains('sel')`, c.i, c.id, c.i))
		marked := eval[[]string](t, ctx, `[...document.querySelectorAll('.tcard.sel')].map((e) => e.dataset.target)`)
		if len(marked) != 1 || marked[0] != c.id {
			t.Errorf("after a click on %s's card, cards marked: %v", c.id, marked)
		}
		shot(t, ctx, c.id)
	}
	// The mark stays through the next frame's panel.
	eval[bool](t, ctx, `(window.__pw.editor.nudge(0, -1), true)`)
	waitFor(t, ctx, "the nudge's frame", fresh)
	if m := eval[[]string](t, ctx, `[...document.querySelectorAll('.tcard.sel')].map((e) => e.dataset.target)`); len(m) != 1 || m[0] != "skiff" {
		t.Errorf("after a frame, cards marked: %v, want the skiff's", m)
	}
}

// TestNewSceneShowsItsStory: a scene picked from the menu opens with its
// story (name, notes, masked targets) in view at the top of the figures
// column; the column stayed scrolled where the last scene's cards were,
// so the new scene's name and notes were out of sight.
func TestNewSceneShowsItsStory(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the cards", fresh+` && document.querySelectorAll('.tcard[data-target]').length === 3`)
	// The user reads the cards further down: the wheel over the column.
	r := eval[[]float64](t, ctx, `(() => { const r = document.querySelector('.figures').getBoundingClientRect(); return [r.left + r.width / 2, r.top + r.height / 2]; })()`)
	mouse(t, ctx, chromedp.MouseMoved, r[0], r[1])
	eval[bool](t, ctx, `(window.__scrolled = new Promise((ok) => document.querySelector('.figures').addEventListener('scrollend', () => ok(true), { once: true })), true)`)
	wheelAt(t, ctx, r[0], r[1], 800)
	// The scroll animates; it has ended before the next scene is picked.
	eval[bool](t, ctx, `window.__scrolled`)
	waitFor(t, ctx, "the column scrolled", `document.querySelector('.figures').scrollTop > 300`)
	loadDemo(t, ctx, "squall-line")
	waitFor(t, ctx, "the new story", fresh+` && document.querySelector('.story-name').textContent === window.__pw.store.scenario.name`)
	inView := eval[bool](t, ctx, `(() => { const c = document.querySelector('.figures').getBoundingClientRect();
		const n = document.querySelector('.story-name').getBoundingClientRect(); return n.top >= c.top && n.bottom <= c.bottom; })()`)
	if !inView {
		t.Errorf("the new scene's name is out of view: the figures column is scrolled to %v px", eval[float64](t, ctx, `document.querySelector('.figures').scrollTop`))
	}
	shot(t, ctx, "")
}

// TestBlindZonesSummaryWhole: at 1280×720 the line over the blind-zones
// map shows whole: cut to one line it read "3 CPIs, 2-of-3 · unambiguous
// to 1274.1 km · first c…", the common blind speed and every target's
// count of CPIs out of sight (its tooltip holds the reasons only).
func TestBlindZonesSummaryWhole(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "hill-clutter-doppler")
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="blindzones"]`)))
	waitFor(t, ctx, "the summary and the map", fresh+` && document.querySelector('#sched-sum').textContent.includes('jet') && window.__pw.plots.charts.blindzones && window.__pw.plots.charts.blindzones.getOption().series.length > 0`)
	cut := eval[bool](t, ctx, `(() => { const e = document.querySelector('#sched-sum'); return e.scrollWidth > e.clientWidth + 1 || e.scrollHeight > e.clientHeight + 1; })()`)
	if cut {
		t.Errorf("the blind-zones summary is cut: %q", eval[string](t, ctx, `document.querySelector('#sched-sum').textContent`))
	}
	if h := eval[float64](t, ctx, `document.querySelector('#chart-blindzones').getBoundingClientRect().height`); h < 150 {
		t.Errorf("the blind-zones map is %.0f px high under its summary", h)
	}
	shot(t, ctx, "")
}

// TestFloorsNoteWhole: at 1280×720 the Floors tab's note says whole how
// to pick another target (it was cut to "… a row of the target t…"), and
// a click on a target's card picks it.
func TestFloorsNoteWhole(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the cards", fresh+` && document.querySelectorAll('.tcard[data-target]').length === 3`)
	do(t, ctx, chromedp.Click(chromedp.CSS(`.plot-head [data-show="floors"]`)))
	waitFor(t, ctx, "the floors of the strongest", `document.querySelector('#floors-note').textContent.includes('strongest') && window.__pw.plots.charts.floors.getOption() && window.__pw.plots.charts.floors.getOption().series.length > 0`)
	const jsCut = `(() => { const e = document.querySelector('#floors-note'); return e.scrollWidth > e.clientWidth + 1 || e.scrollHeight > e.clientHeight + 1; })()`
	if eval[bool](t, ctx, jsCut) {
		t.Errorf("the Floors note is cut: %q", eval[string](t, ctx, `document.querySelector('#floors-note').textContent`))
	}
	shot(t, ctx, "strongest")
	do(t, ctx, chromedp.ScrollIntoView(chromedp.CSS(`.tcard[data-target="pilot-boat"] .tcard-nums`)), chromedp.Click(chromedp.CSS(`.tcard[data-target="pilot-boat"] .tcard-nums`)))
	waitFor(t, ctx, "the pilot boat's floors", `document.querySelector('#floors-note').textContent.includes('pilot-boat')`)
	if eval[bool](t, ctx, jsCut) {
		t.Errorf("the Floors note is cut: %q", eval[string](t, ctx, `document.querySelector('#floors-note').textContent`))
	}
	shot(t, ctx, "pilot-boat")
	// On a pulse train the map-row picker shares the line: the note stays
	// whole and the plot keeps its room.
	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the train's floors", fresh+` && !document.querySelector('.floors-row').hidden && window.__pw.plots.charts.floors.getOption().series.length > 0`)
	if eval[bool](t, ctx, jsCut) {
		t.Errorf("the Floors note is cut on a pulse train: %q", eval[string](t, ctx, `document.querySelector('#floors-note').textContent`))
	}
	if h := eval[float64](t, ctx, `document.querySelector('#chart-floors').getBoundingClientRect().height`); h < 170 {
		t.Errorf("the Floors plot is %.0f px high under its note and map-row picker, want at least 170", h)
	}
	shot(t, ctx, "train")
}
