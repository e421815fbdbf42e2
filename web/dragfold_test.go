package web_test

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/chromedp/chromedp"
)

// dragMarker drags target id's profile marker dx px to the right with
// real mouse events and returns the range the pointer moved over, m.
func dragMarker(t *testing.T, ctx context.Context, id string, dx float64) float64 {
	t.Helper()
	p := markerPx(t, ctx, id)
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	x, y := ox+p[0], oy+p[1]
	moved := eval[float64](t, ctx, fmt.Sprintf(`window.__pw.plots.rangeAt(%g) - window.__pw.plots.rangeAt(%g)`, p[0]+dx, p[0]))
	mouse(t, ctx, chromedp.MouseMoved, x, y)
	mouse(t, ctx, chromedp.MousePressed, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	for i := 1; i <= 6; i++ {
		mouse(t, ctx, chromedp.MouseMoved, x+dx*float64(i)/6, y, held)
	}
	mouse(t, ctx, chromedp.MouseReleased, x+dx, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	return moved
}

// TestDragMovesTargetByThePointer: a dragged marker's target moves as
// far as the pointer does. A folded target (its marker is its ghost at
// the apparent range) stays folded: a 40 px drag of long-pulse-blind's
// airliner at 210 km put it at 71 km, detected, the scene's point gone.
// An extended target's marker (its peak) follows the pointer instead of
// jumping by the distance from its near edge to its peak.
func TestDragMovesTargetByThePointer(t *testing.T) {
	ctx := mustBrowser(t)
	do(t, ctx, chromedp.EmulateViewport(1280, 720))
	openPage(t, ctx, mustServer(t))
	loadDemo(t, ctx, "long-pulse-blind")
	waitFor(t, ctx, "the folded airliner", fresh+` && `+jsTarget+`('airliner-far').status === 'folded'`)
	p0 := markerPx(t, ctx, "airliner-far")
	moved := dragMarker(t, ctx, "airliner-far", 40)
	want := 210000 + moved
	waitFor(t, ctx, "the dragged airliner's frame", fresh+` && window.__pw.store.scenario.targets[3].range_m !== 210000 && `+jsTarget+`('airliner-far').range_m === window.__pw.store.scenario.targets[3].range_m`)
	if got := eval[float64](t, ctx, `window.__pw.store.scenario.targets[3].range_m`); math.Abs(got-want) > 60 {
		t.Errorf("airliner-far dragged to %g m, want about %g m (210 km and the %g m the pointer moved)", got, want, moved)
	}
	if st := eval[string](t, ctx, jsTarget+`('airliner-far').status`); st != "folded" {
		t.Errorf("airliner-far is %s after a small drag, want still folded", st)
	}
	if p1 := markerPx(t, ctx, "airliner-far"); math.Abs(p1[0]-p0[0]-40) > 3 {
		t.Errorf("airliner-far's marker moved %.1f px, want 40", p1[0]-p0[0])
	}
	shot(t, ctx, "folded")

	loadDemo(t, ctx, "hill-clutter-doppler")
	waitFor(t, ctx, "the ridge", fresh+` && !!`+jsMarker+`('ridge')`)
	p0 = markerPx(t, ctx, "ridge")
	moved = dragMarker(t, ctx, "ridge", 40)
	waitFor(t, ctx, "the dragged ridge's frame", fresh+` && window.__pw.store.scenario.targets[0].range_start_m !== 6000`)
	if got := eval[float64](t, ctx, `window.__pw.store.scenario.targets[0].range_start_m`); math.Abs(got-6000-moved) > 30 {
		t.Errorf("the ridge's near edge dragged to %g m, want about %g m", got, 6000+moved)
	}
	if p1 := markerPx(t, ctx, "ridge"); math.Abs(p1[0]-p0[0]-40) > 3 {
		t.Errorf("the ridge's marker moved %.1f px, want 40", p1[0]-p0[0])
	}
	shot(t, ctx, "extended")
}
