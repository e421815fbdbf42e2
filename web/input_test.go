package web_test

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// Real mouse events, as the browser delivers them from a user: CDP
// Input.dispatchMouseEvent at page coordinates.

// chartOrigin returns the page position of the element at sel.
func chartOrigin(t *testing.T, ctx context.Context, sel string) (float64, float64) {
	t.Helper()
	r := eval[[]float64](t, ctx, fmt.Sprintf(`(() => { const r = document.querySelector(%q).getBoundingClientRect(); return [r.left, r.top]; })()`, sel))
	return r[0], r[1]
}

func mouse(t *testing.T, ctx context.Context, typ input.DispatchMouseEventType, x, y float64, opts ...chromedp.MouseOption) {
	t.Helper()
	if err := chromedp.Do(ctx, chromedp.MouseEvent(typ, x, y, opts...)); err != nil {
		t.Fatalf("mouse %s at %.0f,%.0f: %v", typ, x, y, err)
	}
}

// held marks a move with the left button down.
func held(p *input.DispatchMouseEventParams) {
	p.Button = input.MouseButtonLeft
	p.Buttons = 1
}

// wheelAt turns the mouse wheel at page (x, y) by dy px (negative: away
// from the user, up). Chromium wants deltaX as well, which the generated
// parameters leave out when it is 0, so this sends its own.
func wheelAt(t *testing.T, ctx context.Context, x, y, dy float64) {
	t.Helper()
	type wheelParams struct {
		Type   string  `json:"type"`
		X      float64 `json:"x"`
		Y      float64 `json:"y"`
		DeltaX float64 `json:"deltaX"`
		DeltaY float64 `json:"deltaY"`
	}
	cmd := cdp.Command[wheelParams, cdp.Empty]{Method: input.CommandDispatchMouseEvent}
	err := chromedp.Do(ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := cdp.Call(ctx, tg, cmd, wheelParams{Type: "mouseWheel", X: x, Y: y, DeltaY: dy})
		return err
	}))
	if err != nil {
		t.Fatalf("wheel at %.0f,%.0f: %v", x, y, err)
	}
}

// clickAt clicks at (x, y) in the element at sel.
func clickAt(t *testing.T, ctx context.Context, sel string, x, y float64) {
	t.Helper()
	ox, oy := chartOrigin(t, ctx, sel)
	mouse(t, ctx, chromedp.MouseMoved, ox+x, oy+y)
	mouse(t, ctx, chromedp.MousePressed, ox+x, oy+y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	mouse(t, ctx, chromedp.MouseReleased, ox+x, oy+y, chromedp.ButtonLeft, chromedp.ClickCount(1))
}

// markerPx returns the pixel of a target's marker on the profile, in the
// chart's own coordinates.
func markerPx(t *testing.T, ctx context.Context, id string) []float64 {
	t.Helper()
	return eval[[]float64](t, ctx, fmt.Sprintf(`(() => { const m = %s(%q); return window.__pw.plots.charts.profile.convertToPixel({seriesId: 'markers'}, m.value); })()`, jsMarker, id))
}

// fresh is a JS condition: the newest edit's frame is shown, on every
// plot and panel (the page draws the profile first and the rest after
// its paint).
const fresh = `(window.__pw.frame() && window.__pw.frame().id >= window.__pw.session.nextId - 1 && window.__pw.settled() === window.__pw.frame().id)`

func TestDragMarkerMovesTarget(t *testing.T) {
	ctx := mustBrowser(t)
	openPage(t, ctx, mustServer(t))
	waitFor(t, ctx, "the start scene", jsMarker+`('skiff')`)
	p := markerPx(t, ctx, "skiff")
	ox, oy := chartOrigin(t, ctx, "#chart-profile")
	x, y := ox+p[0], oy+p[1]
	const dx = 80.0 // px to the right
	want := eval[float64](t, ctx, fmt.Sprintf(`window.__pw.plots.rangeAt(%g)`, p[0]+dx))
	mouse(t, ctx, chromedp.MouseMoved, x, y)
	mouse(t, ctx, chromedp.MousePressed, x, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	for i := 1; i <= 8; i++ {
		mouse(t, ctx, chromedp.MouseMoved, x+dx*float64(i)/8, y, held)
	}
	mouse(t, ctx, chromedp.MouseReleased, x+dx, y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	got := eval[float64](t, ctx, `window.__pw.store.scenario.targets[1].range_m`)
	if math.Abs(got-want) > 20 || got <= 6300 {
		t.Errorf("skiff dragged to %g m, want about %g m", got, want)
	}
	waitFor(t, ctx, "the dragged skiff's report", fresh+` && Math.abs(`+jsTarget+`('skiff').range_m - window.__pw.store.scenario.targets[1].range_m) < 1e-6`)
	if q := markerPx(t, ctx, "skiff"); math.Abs(q[0]-(p[0]+dx)) > 6 {
		t.Errorf("skiff's marker at x=%.1f px after the drag, want about %.1f", q[0], p[0]+dx)
	}
	shot(t, ctx, "dragged")

	// The wheel over a marker nudges that target's RCS by 1 dB per notch.
	rcs0 := eval[float64](t, ctx, `window.__pw.store.scenario.targets[2].rcs_dbsm`)
	q := markerPx(t, ctx, "pilot-boat")
	mouse(t, ctx, chromedp.MouseMoved, ox+q[0], oy+q[1])
	wheelAt(t, ctx, ox+q[0], oy+q[1], -100)
	wheelAt(t, ctx, ox+q[0], oy+q[1], -100)
	waitFor(t, ctx, "two notches up", fmt.Sprintf(`window.__pw.store.scenario.targets[2].rcs_dbsm === %g`, rcs0+2))
	// The arrow keys nudge the selected target (the pilot boat, selected
	// by the wheel).
	do(t, ctx, chromedp.KeyEvent(kb.ArrowDown))
	waitFor(t, ctx, "one key step down", fmt.Sprintf(`window.__pw.store.scenario.targets[2].rcs_dbsm === %g`, rcs0+1))
	waitFor(t, ctx, "the nudged report", fresh)
	snr := eval[float64](t, ctx, jsTarget+`('pilot-boat').snr_db`)
	shot(t, ctx, "nudged")

	// Undo takes back the nudges (one step, they coalesce) and then the
	// drag; redo puts them back.
	do(t, ctx, chromedp.KeyEvent("z", chromedp.KeyModifiers(chromedp.ModifierCtrl)))
	waitFor(t, ctx, "undo of the nudges", fmt.Sprintf(`window.__pw.store.scenario.targets[2].rcs_dbsm === %g`, rcs0))
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-undo`)))
	waitFor(t, ctx, "undo of the drag", `window.__pw.store.scenario.targets[1].range_m === 6300`)
	waitFor(t, ctx, "the undone report", fresh+` && `+jsTarget+`('skiff').range_m === 6300`)
	do(t, ctx, chromedp.KeyEvent("y", chromedp.KeyModifiers(chromedp.ModifierCtrl)))
	waitFor(t, ctx, "redo of the drag", fmt.Sprintf(`Math.abs(window.__pw.store.scenario.targets[1].range_m - %g) < 1e-6`, got))
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-redo`)))
	waitFor(t, ctx, "redo of the nudges", fmt.Sprintf(`window.__pw.store.scenario.targets[2].rcs_dbsm === %g`, rcs0+1))
	waitFor(t, ctx, "the redone report", fresh+fmt.Sprintf(` && Math.abs(%s('pilot-boat').snr_db - %g) < 1e-9`, jsTarget, snr))
	shot(t, ctx, "redone")
}
