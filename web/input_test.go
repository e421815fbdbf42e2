package web_test

import (
	"context"
	"fmt"
	"testing"

	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"
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

// wheel scrolls by dy px (negative: away from the user, up).
func wheel(dy float64) chromedp.MouseOption {
	return func(p *input.DispatchMouseEventParams) { p.DeltaY = dy }
}

// clickAt clicks at (x, y) in the element at sel.
func clickAt(t *testing.T, ctx context.Context, sel string, x, y float64) {
	t.Helper()
	ox, oy := chartOrigin(t, ctx, sel)
	mouse(t, ctx, chromedp.MouseMoved, ox+x, oy+y)
	mouse(t, ctx, chromedp.MousePressed, ox+x, oy+y, chromedp.ButtonLeft, chromedp.ClickCount(1))
	mouse(t, ctx, chromedp.MouseReleased, ox+x, oy+y, chromedp.ButtonLeft, chromedp.ClickCount(1))
}
