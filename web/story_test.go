package web_test

import (
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestSceneStoryOnScreen: the scene's notes and the masked target's reason
// are on screen; notes the user writes travel with the share link.
func TestSceneStoryOnScreen(t *testing.T) {
	ctx := mustBrowser(t)
	base := mustServer(t)
	openPage(t, ctx, base)
	waitFor(t, ctx, "the skiff masked", jsTarget+`('skiff').status === 'masked'`)
	waitFor(t, ctx, "the story", `!!document.querySelector('.story .story-masked')`)
	story := eval[string](t, ctx, `document.querySelector('.story').innerText`)
	for _, want := range []string{"Harbour approach: skiff beside a tanker", "Try a Taylor window", "skiff", "hidden by tanker", "Taylor window (−35 dB"} {
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
	tab, cancel := chromedp.NewContext(ctx)
	defer cancel()
	openPage(t, tab, base+link)
	waitFor(t, tab, "the linked note", `document.querySelector('.story').innerText.includes('Customer demo: the skiff hides')`)
	if v := eval[string](t, tab, `document.querySelector('textarea[data-path="notes"]').value`); v != "Customer demo: the skiff hides in the tanker's sidelobes." {
		t.Errorf("the linked scene's notes field holds %q", v)
	}
	shot(t, tab, "linked-note")
}
